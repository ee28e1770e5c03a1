// A lower bound on trays from a search over how the larger pieces can share trays.
//
// Dropping pieces never needs more trays, so the fewest trays for the pieces whose short side is
// at least q is a lower bound for all of them. Those pieces are few and large, and a
// branch-and-bound that deals them out to at most B trays, largest first, often shows quickly that
// B trays cannot hold them (pieces too big to share, or a tray that can take only one of the
// pieces that fit nowhere else): the tray count then is at least B + 1. This is the bin-assignment
// tree of S. Martello & D. Vigo, "Exact solution of the two-dimensional finite bin packing
// problem", Management Science 44(3):388–399 (1998) [from memory], run on a reduced instance as
// their reduction procedures do, with the tray test relaxed so that the answer stays a bound:
//
// - A set of up to four pieces is tested exactly. A packing of at most three rectangles can
//   always be separated by a straight cut, and a packing of four either can or is a pinwheel
//   (four pieces turning round a centre, each one pushable into its own corner); the cut
//   packings are found by the frontier of guillotine layouts over all splits, the pinwheels by
//   trying every piece in every corner both ways. [The four-piece fact is from memory; the tests
//   check it against random four-piece packings.]
// - A set of five or more counts as fitting when its area fits and every four of its pieces fit
//   (past eight pieces, the area alone). That only ever says "fits" too often, so the search can only find too few trays, never too
//   many: the bound stays valid.
//
// The search is budgeted; when the budget runs out nothing is claimed.

export interface BoundPiece {
  w: number;
  h: number;
}

/** Pareto set of (width, depth) of guillotine layouts, keeping only those that fit W×D. */
type Frontier = readonly (readonly [number, number])[];

function pareto(points: (readonly [number, number])[]): Frontier {
  points.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  const out: (readonly [number, number])[] = [];
  let bestH = Infinity;
  for (const p of points) {
    if (p[1] < bestH) {
      out.push(p);
      bestH = p[1];
    }
  }
  return out;
}

const EPS = 1e-9;

/** Exact and relaxed tray tests for sets of pieces, with their answers kept by set. */
export class TrayFitTester {
  private readonly frontier = new Map<string, Frontier>();
  private readonly fitCache = new Map<string, boolean>();
  readonly area: number[];

  constructor(
    readonly pieces: readonly BoundPiece[],
    readonly W: number,
    readonly D: number,
  ) {
    this.area = pieces.map((p) => p.w * p.h);
  }

  private frontierOf(set: readonly number[]): Frontier {
    const key = set.join(",");
    const known = this.frontier.get(key);
    if (known) return known;
    const pts: (readonly [number, number])[] = [];
    if (set.length === 1) {
      const p = this.pieces[set[0]];
      for (const [a, b] of [
        [p.w, p.h],
        [p.h, p.w],
      ] as const) {
        if (a <= this.W + EPS && b <= this.D + EPS) pts.push([a, b]);
      }
    } else {
      // Every split into two non-empty halves (the first piece always in the left half, so each
      // split is seen once), the halves side by side or one above the other.
      const rest = set.slice(1);
      const m = rest.length;
      for (let mask = 0; mask < 1 << m; mask++) {
        const left = [set[0]];
        const right: number[] = [];
        for (let k = 0; k < m; k++) (mask & (1 << k) ? left : right).push(rest[k]);
        if (right.length === 0) continue;
        const fa = this.frontierOf(left);
        const fb = this.frontierOf(right);
        for (const [wa, ha] of fa) {
          for (const [wb, hb] of fb) {
            const side = [wa + wb, Math.max(ha, hb)] as const;
            if (side[0] <= this.W + EPS && side[1] <= this.D + EPS) pts.push(side);
            const stack = [Math.max(wa, wb), ha + hb] as const;
            if (stack[0] <= this.W + EPS && stack[1] <= this.D + EPS) pts.push(stack);
          }
        }
      }
    }
    const f = pareto(pts);
    this.frontier.set(key, f);
    return f;
  }

  /** Four pieces as a pinwheel: each in its own corner of the tray, either way round. */
  private pinwheel(set: readonly number[]): boolean {
    const { W, D } = this;
    const perms = permutations(set);
    for (const order of perms) {
      for (let turn = 0; turn < 16; turn++) {
        const r = order.map((i, k) => {
          const p = this.pieces[i];
          const t = (turn >> k) & 1;
          return t ? { w: p.h, h: p.w } : { w: p.w, h: p.h };
        });
        if (r.some((x) => x.w > W + EPS || x.h > D + EPS)) continue;
        // Corners: 0 bottom-left, 1 bottom-right, 2 top-right, 3 top-left.
        const rects = [
          { x0: 0, y0: 0, x1: r[0].w, y1: r[0].h },
          { x0: W - r[1].w, y0: 0, x1: W, y1: r[1].h },
          { x0: W - r[2].w, y0: D - r[2].h, x1: W, y1: D },
          { x0: 0, y0: D - r[3].h, x1: r[3].w, y1: D },
        ];
        let ok = true;
        for (let a = 0; a < 4 && ok; a++) {
          for (let b = a + 1; b < 4 && ok; b++) {
            const A = rects[a];
            const B = rects[b];
            if (A.x0 < B.x1 - EPS && B.x0 < A.x1 - EPS && A.y0 < B.y1 - EPS && B.y0 < A.y1 - EPS) ok = false;
          }
        }
        if (ok) return true;
      }
    }
    return false;
  }

  /** Whether the pieces `set` (sorted indices, at most four) can share one tray, exactly. */
  fitsExactly(set: readonly number[]): boolean {
    const key = set.join(",");
    const known = this.fitCache.get(key);
    if (known !== undefined) return known;
    let a = 0;
    for (const i of set) a += this.area[i];
    const ok = a <= this.W * this.D + EPS && (this.frontierOf(set).length > 0 || (set.length === 4 && this.pinwheel(set)));
    // The caches only save work; past this size they start over rather than grow without end.
    if (this.fitCache.size > 200_000) this.fitCache.clear();
    if (this.frontier.size > 200_000) this.frontier.clear();
    this.fitCache.set(key, ok);
    return ok;
  }

  /**
   * Whether piece `i` may join `group` (sorted indices that passed this test before): exact up to
   * four pieces; above four, the area and every four of the pieces that include `i` (up to
   * MAX_CHECKED pieces; past that the area alone), which can only say "fits" too often.
   */
  fitsWith(group: readonly number[], i: number, groupArea: number): boolean {
    if (groupArea + this.area[i] > this.W * this.D + EPS) return false;
    const set = [...group, i].sort((a, b) => a - b);
    if (set.length <= 4) return this.fitsExactly(set);
    if (set.length > MAX_CHECKED) return true;
    const g = group;
    for (let a = 0; a < g.length; a++) {
      for (let b = a + 1; b < g.length; b++) {
        for (let c = b + 1; c < g.length; c++) {
          if (!this.fitsExactly([g[a], g[b], g[c], i].sort((x, y) => x - y))) return false;
        }
      }
    }
    return true;
  }
}

/** Largest set whose four-piece subsets are all checked when a piece joins it (C(7, 3) = 35 checks). */
const MAX_CHECKED = 8;

function permutations(xs: readonly number[]): number[][] {
  if (xs.length <= 1) return [[...xs]];
  const out: number[][] = [];
  xs.forEach((x, i) => {
    for (const p of permutations([...xs.slice(0, i), ...xs.slice(i + 1)])) out.push([x, ...p]);
  });
  return out;
}

export type TrayCountAnswer = "fits" | "too-few" | "unknown";

/**
 * Whether the pieces can be dealt out to `trays` trays under the tester's (relaxed) tray test:
 * "too-few" is a proof that more trays are needed, "fits" only that the relaxation allows it,
 * "unknown" that `budget` nodes ran out first.
 */
export function dealToTrays(tester: TrayFitTester, members: readonly number[], trays: number, budget: number): { answer: TrayCountAnswer; nodes: number } {
  const A = tester.W * tester.D;
  const order = [...members].sort((a, b) => tester.area[b] - tester.area[a] || a - b);
  // The only area test needed: however the pieces are dealt, the trays' spare room adds up to this.
  if (order.reduce((s, i) => s + tester.area[i], 0) > trays * A + EPS) return { answer: "too-few", nodes: 1 };
  const groups: { set: number[]; area: number }[] = [];
  let nodes = 0;
  let outOfBudget = false;
  const dfs = (k: number): boolean => {
    if (k === order.length) return true;
    if (++nodes > budget) {
      outOfBudget = true;
      return false;
    }
    const i = order[k];
    const ai = tester.area[i];
    for (const g of groups) {
      if (g.area + ai > A + EPS || !tester.fitsWith(g.set, i, g.area)) continue;
      const prev = g.set;
      g.set = [...prev, i].sort((a, b) => a - b);
      g.area += ai;
      const ok = dfs(k + 1);
      g.area -= ai;
      g.set = prev;
      if (ok) return true;
      if (outOfBudget) return false;
    }
    if (groups.length < trays) {
      groups.push({ set: [i], area: ai });
      const ok = dfs(k + 1);
      groups.pop();
      if (ok) return true;
    }
    return false;
  };
  const ok = dfs(0);
  return { answer: ok ? "fits" : outOfBudget ? "unknown" : "too-few", nodes: Math.min(nodes, budget) + 1 };
}

/**
 * Raises `start` (a bound already known) while the search proves that many trays too few for the
 * pieces whose short side is at least q, for each q among the pieces' short sides (largest first)
 * that leaves at most `maxPieces` of them. `budget` nodes are shared by all the proofs tried;
 * `stopAt` (a plan's tray count) ends the work once the bound reaches it.
 */
export function sharingTrayBound(
  pieces: readonly BoundPiece[],
  W: number,
  D: number,
  start: number,
  opts: { budget?: number; maxPieces?: number; stopAt?: number } = {},
): { bound: number; nodes: number } {
  let left = opts.budget ?? 20_000;
  const maxPieces = opts.maxPieces ?? 40;
  const stopAt = opts.stopAt ?? Infinity;
  const tester = new TrayFitTester(pieces, W, D);
  const short = pieces.map((p) => Math.min(p.w, p.h));
  const qs = [...new Set(short)].sort((a, b) => b - a);
  let best = start;
  for (const q of qs) {
    if (left <= 0 || best >= stopAt) break;
    const members = pieces.map((_, i) => i).filter((i) => short[i] >= q);
    if (members.length > maxPieces) break;
    if (members.length <= best) continue;
    for (;;) {
      const r = dealToTrays(tester, members, best, left);
      left -= r.nodes;
      if (r.answer !== "too-few") break;
      best++;
      if (best >= stopAt) break;
    }
  }
  return { bound: best, nodes: (opts.budget ?? 20_000) - left };
}
