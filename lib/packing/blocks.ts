// Building blocks: pieces that share a side length exactly are joined along it into one larger
// rectangle, as in the bottom-up combination of P.Y. Wang, "Two algorithms for constrained
// two-dimensional cutting stock problems", Operations Research 31(3), 1983 [from memory], here
// restricted to joins without waste. Pieces cut from one tray share their cut lines, so joining
// them rebuilds large parts of the original tray and leaves the exact search far fewer, larger
// pieces to arrange. Joins along a full tray side are only made when they complete the tray:
// many unrelated strips span a tray side, and joining two of them usually strands a third.

import type { ItemModel } from "./tray-model";

export interface BlockPart {
  item: ItemModel;
  dx: number;
  dy: number;
  /** Exact grown size as placed within the block. */
  w: number;
  h: number;
  /** Turned relative to the item's own footprint. */
  rotated: boolean;
}

export interface Block {
  w: number;
  h: number;
  mass: number;
  parts: BlockPart[];
}

export function singleBlock(it: ItemModel, grow: number): Block {
  const w = it.pw + grow;
  const h = it.ph + grow;
  return { w, h, mass: it.mass, parts: [{ item: it, dx: 0, dy: 0, w, h, rotated: false }] };
}

export function turnBlock(b: Block): Block {
  return {
    w: b.h,
    h: b.w,
    mass: b.mass,
    parts: b.parts.map((p) => ({ item: p.item, dx: p.dy, dy: p.dx, w: p.h, h: p.w, rotated: !p.rotated })),
  };
}

/** Joins b beside a (shared height) or, with `stack`, on top of a (shared width). */
function join(a: Block, b: Block, stack: boolean): Block {
  if (stack) {
    return {
      w: Math.max(a.w, b.w),
      h: a.h + b.h,
      mass: a.mass + b.mass,
      parts: [...a.parts, ...b.parts.map((p) => ({ ...p, dy: p.dy + a.h }))],
    };
  }
  return {
    w: a.w + b.w,
    h: Math.max(a.h, b.h),
    mass: a.mass + b.mass,
    parts: [...a.parts, ...b.parts.map((p) => ({ ...p, dx: p.dx + a.w }))],
  };
}

/**
 * Joins blocks with a common side (|Δ| ≤ matchTol) while the result still fits the W×D tray.
 * Each new block looks for a partner among all blocks present, so the work stays near-linear.
 * Returns the blocks, largest first.
 */
export function buildBlocks(
  items: readonly ItemModel[],
  W: number,
  D: number,
  grow: number,
  matchTol: number,
  fitTol: number,
  /** "unique": join two blocks only when each is the other's sole partner (no guessing). */
  mode: "greedy" | "unique" = "greedy",
): Block[] {
  const near = (x: number, y: number) => Math.abs(x - y) <= matchTol;
  const fits = (a: number, b: number) => (a <= W + fitTol && b <= D + fitTol) || (a <= D + fitTol && b <= W + fitTol);
  const bucket = Math.max(matchTol * 4, 1e-6);
  const blocks = new Map<number, Block>();
  const index = new Map<number, Set<number>>();
  let nextId = 0;
  const sides = (b: Block) => (Math.abs(b.w - b.h) <= 1e-12 ? [b.w] : [b.w, b.h]);
  const add = (b: Block): number => {
    const id = nextId++;
    blocks.set(id, b);
    for (const s of sides(b)) {
      const k = Math.round(s / bucket);
      let set = index.get(k);
      if (!set) index.set(k, (set = new Set()));
      set.add(id);
    }
    return id;
  };
  const remove = (id: number) => {
    const b = blocks.get(id)!;
    for (const s of sides(b)) index.get(Math.round(s / bucket))?.delete(id);
    blocks.delete(id);
  };
  type Join = { j: number; si: "w" | "h"; sj: "w" | "h"; completes: boolean };
  const partners = (id: number): Join[] => {
    const a = blocks.get(id)!;
    const out: Join[] = [];
    for (const si of ["w", "h"] as const) {
      const s = a[si];
      const other = si === "w" ? a.h : a.w;
      const k = Math.round(s / bucket);
      for (const kk of [k - 1, k, k + 1]) {
        for (const j of index.get(kk) ?? []) {
          if (j === id) continue;
          const b = blocks.get(j)!;
          for (const sj of ["w", "h"] as const) {
            if (!near(b[sj], s)) continue;
            const sum = other + (sj === "w" ? b.h : b.w);
            if (!fits(sum, Math.max(s, b[sj]))) continue;
            const fullSide = near(s, W) || near(s, D);
            const completes = (near(s, W) && near(sum, D)) || (near(s, D) && near(sum, W));
            if (fullSide && !completes) continue;
            if (!out.some((x) => x.j === j && x.si === si && x.sj === sj)) out.push({ j, si, sj, completes });
          }
        }
      }
    }
    return out;
  };
  const queue: number[] = [];
  for (const it of items) queue.push(add(singleBlock(it, grow)));
  while (queue.length > 0) {
    const id = queue.pop()!;
    const a = blocks.get(id);
    if (!a) continue;
    const mine = partners(id);
    let best: Join | undefined = mine.find((x) => x.completes);
    if (!best && mine.length > 0) {
      if (mode === "greedy") best = mine[0];
      else if (new Set(mine.map((x) => x.j)).size === 1) {
        const theirs = partners(mine[0].j);
        if (theirs.every((x) => x.j === id)) best = mine[0];
      }
    }
    if (!best) continue;
    // Orient both so that the shared side is the height, then put them side by side.
    const left = best.si === "h" ? a : turnBlock(a);
    const b = blocks.get(best.j)!;
    const right = best.sj === "h" ? b : turnBlock(b);
    const touched = new Set<number>();
    for (const x of [a, b]) for (const s of sides(x)) for (const kk of [-1, 0, 1]) for (const j of index.get(Math.round(s / bucket) + kk) ?? []) touched.add(j);
    remove(id);
    remove(best.j);
    const joined = add(join(left, right, false));
    // Blocks that competed for these sides may now have a single partner left.
    if (mode === "unique") for (const j of touched) if (blocks.has(j)) queue.push(j);
    queue.push(joined);
  }
  const out = completeStrips([...blocks.values()], W, D, matchTol);
  return out.sort((p, q) => q.w * q.h - p.w * p.h);
}

/**
 * Strips spanning a full tray side (a tray cut three or more times the same way leaves several)
 * are only worth joining when they make up a whole tray: find small sets of them whose widths sum
 * to the other tray side, smallest sets first (fewer chances of a chance match).
 */
function completeStrips(blocks: Block[], W: number, D: number, matchTol: number): Block[] {
  const near = (x: number, y: number, k = 1) => Math.abs(x - y) <= matchTol * k;
  let rest = blocks;
  for (const [span, target] of [
    [D, W],
    [W, D],
  ] as const) {
    // Strips oriented with the spanning side as height; the width is what must add up.
    const strips: Block[] = [];
    const others: Block[] = [];
    for (const b of rest) {
      const full = (near(b.w, W) && near(b.h, D)) || (near(b.w, D) && near(b.h, W));
      if (!full && near(b.h, span)) strips.push(b);
      else if (!full && near(b.w, span)) strips.push(turnBlock(b));
      else others.push(b);
    }
    strips.sort((p, q) => q.w - p.w);
    const alive = strips.map(() => true);
    const pickSubset = (k: number): number[] | null => {
      const chosen: number[] = [];
      const dfs = (start: number, sum: number): boolean => {
        if (chosen.length === k) return near(sum, target, k);
        for (let i = start; i < strips.length; i++) {
          if (!alive[i]) continue;
          const s = sum + strips[i].w;
          if (s > target + matchTol * k) continue;
          // Widths are sorted down: if even this one cannot reach the target with the slots left, stop.
          if (s + strips[i].w * (k - chosen.length - 1) < target - matchTol * k) return false;
          chosen.push(i);
          if (dfs(i + 1, s)) return true;
          chosen.pop();
        }
        return false;
      };
      return dfs(0, 0) ? [...chosen] : null;
    };
    const joined: Block[] = [];
    for (let k = 2; k <= 5; k++) {
      for (let set = pickSubset(k); set; set = pickSubset(k)) {
        let b = strips[set[0]];
        alive[set[0]] = false;
        for (const i of set.slice(1)) {
          b = join(b, strips[i], false);
          alive[i] = false;
        }
        joined.push(b);
      }
    }
    rest = [...others, ...joined, ...strips.filter((_, i) => alive[i])];
  }
  return rest;
}
