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
 * Returns the blocks, largest first.
 */
export function buildBlocks(items: readonly ItemModel[], W: number, D: number, grow: number, matchTol: number, fitTol: number): Block[] {
  let blocks = items.map((it) => singleBlock(it, grow));
  const near = (x: number, y: number) => Math.abs(x - y) <= matchTol;
  const fits = (a: number, b: number) => (a <= W + fitTol && b <= D + fitTol) || (a <= D + fitTol && b <= W + fitTol);
  const bucket = Math.max(matchTol * 4, 1e-6);
  for (;;) {
    const index = new Map<number, number[]>();
    blocks.forEach((b, i) => {
      for (const s of b.w === b.h ? [b.w] : [b.w, b.h]) {
        const k = Math.round(s / bucket);
        const list = index.get(k) ?? [];
        list.push(i);
        index.set(k, list);
      }
    });
    let best: { i: number; j: number; si: "w" | "h"; sj: "w" | "h"; completes: boolean } | null = null;
    for (let i = 0; i < blocks.length && !(best && best.completes); i++) {
      const a = blocks[i];
      for (const si of ["w", "h"] as const) {
        const s = a[si];
        const other = si === "w" ? a.h : a.w;
        const k = Math.round(s / bucket);
        for (const kk of [k - 1, k, k + 1]) {
          for (const j of index.get(kk) ?? []) {
            if (j <= i) continue;
            const b = blocks[j];
            for (const sj of ["w", "h"] as const) {
              if (!near(b[sj], s)) continue;
              const sum = other + (sj === "w" ? b.h : b.w);
              if (!fits(sum, Math.max(s, b[sj]))) continue;
              const fullSide = near(s, W) || near(s, D);
              const completes = (near(s, W) && near(sum, D)) || (near(s, D) && near(sum, W));
              if (fullSide && !completes) continue;
              if (!best || (completes && !best.completes)) best = { i, j, si, sj, completes };
            }
          }
        }
      }
    }
    if (!best) break;
    // Orient both so that the shared side is the height, then put them side by side.
    const a = best.si === "h" ? blocks[best.i] : turnBlock(blocks[best.i]);
    const b = best.sj === "h" ? blocks[best.j] : turnBlock(blocks[best.j]);
    const joined = join(a, b, false);
    blocks = blocks.filter((_, k) => k !== best!.i && k !== best!.j);
    blocks.push(joined);
  }
  return blocks.sort((p, q) => q.w * q.h - p.w * p.h);
}
