// Depth-first search for a tray filled without waste. Any exact tiling of a rectangle can be
// built by always covering the lowest, leftmost point of the skyline (the upper edge of what is
// already placed): the piece that covers that point has its corner there and rests on the
// lowest segment. So the search only branches on which piece goes there, which keeps it small
// enough to run under a node budget before the greedy rules. It matters for trays whose pieces
// were cut from full trays, where greedy placement leaves a sliver that costs a whole run.
//
// Every comparison allows `tol`, so a placement may cross a neighbour or the tray line by at most
// `tol` (the callers pass the fit tolerance).

export interface TilePiece<T> {
  /** Exact size of the piece as listed (the search may turn it). */
  w: number;
  h: number;
  mass: number;
  ref: T;
}

export interface TilePlacement<T> {
  ref: T;
  x: number;
  y: number;
  /** Size as placed. */
  w: number;
  h: number;
  rotated: boolean;
}

interface Segment {
  x: number;
  w: number;
  y: number;
}

interface Group<T> {
  a: number;
  b: number;
  pieces: TilePiece<T>[];
  /** Pieces of this group still free, taken from the end of `pieces`. */
  left: number;
}

export interface TileSearchOptions {
  tol: number;
  /** Mass still allowed on the run. */
  massLeft: number;
  /** Piece-group evaluations allowed (a node costs one per piece size still in play). */
  workBudget: number;
}

export interface TileSearchResult<T> {
  placements: TilePlacement<T>[] | null;
  nodes: number;
  work: number;
}

/**
 * The pieces grouped by size (either way round: equal sizes are one branch of the search, not
 * one per piece), largest first, with their total area; `misfits` counts pieces that fit the
 * tray neither way, which are left out of the groups.
 */
function groupBySize<T>(W: number, D: number, pieces: readonly TilePiece<T>[], tol: number): { groups: Group<T>[]; totalArea: number; misfits: number } {
  let totalArea = 0;
  let misfits = 0;
  const groups: Group<T>[] = [];
  const byKey = new Map<string, Group<T>>();
  for (const p of pieces) {
    const lo = Math.min(p.w, p.h);
    const hi = Math.max(p.w, p.h);
    if (!((lo <= W + tol && hi <= D + tol) || (hi <= W + tol && lo <= D + tol))) {
      misfits++;
      continue;
    }
    totalArea += p.w * p.h;
    const key = `${lo.toFixed(3)}x${hi.toFixed(3)}`;
    let g = byKey.get(key);
    if (!g) {
      g = { a: lo, b: hi, pieces: [], left: 0 };
      byKey.set(key, g);
      groups.push(g);
    }
    g.pieces.push(p);
    g.left++;
  }
  // Large pieces first: they are the hard ones to place later.
  groups.sort((p, q) => q.a * q.b - p.a * p.b);
  return { groups, totalArea, misfits };
}

/** The lowest skyline segment still below the tray's far edge (the leftmost of equals), or -1 when the tray is full. */
function lowestOpen(sky: readonly Segment[], D: number, tol: number): number {
  let i = -1;
  for (let k = 0; k < sky.length; k++) {
    if (sky[k].y < D - tol && (i < 0 || sky[k].y < sky[i].y - 1e-9)) i = k;
  }
  return i;
}

/** Covers the W×D tray completely with pieces from `pieces`, or reports that it found no way. */
export function fillTrayExactly<T>(
  W: number,
  D: number,
  pieces: readonly TilePiece<T>[],
  opts: TileSearchOptions,
): TileSearchResult<T> {
  const { tol } = opts;
  const { groups, totalArea } = groupBySize(W, D, pieces, tol);
  if (totalArea < W * D * (1 - 1e-6)) return { placements: null, nodes: 0, work: 0 };
  for (const g of groups) g.pieces.sort((p, q) => q.mass - p.mass);

  let nodes = 0;
  let work = 0;
  let massLeft = opts.massLeft;
  const placed: TilePlacement<T>[] = [];

  const minSideLeft = (): number => {
    let m = Infinity;
    for (const g of groups) if (g.left > 0 && g.a < m) m = g.a;
    return m;
  };

  const dfs = (sky: Segment[]): boolean => {
    nodes++;
    work += groups.length;
    if (work > opts.workBudget) return false;
    const i = lowestOpen(sky, D, tol);
    if (i < 0) return true;
    const seg = sky[i];
    const leftY = i > 0 ? sky[i - 1].y : Infinity;
    const rightY = i < sky.length - 1 ? sky[i + 1].y : Infinity;
    const minSide = minSideLeft();
    if (minSide === Infinity || seg.w < minSide - tol) return false;
    const cands: { g: Group<T>; w: number; h: number; score: number }[] = [];
    for (const g of groups) {
      if (g.left === 0) continue;
      const p = g.pieces[g.left - 1];
      if (p.mass > massLeft * (1 + 1e-12)) continue;
      for (let o = 0; o < 2; o++) {
        if (o === 1 && Math.abs(g.a - g.b) <= 1e-9) break;
        const w = o === 0 ? g.a : g.b;
        const h = o === 0 ? g.b : g.a;
        if (w > seg.w + tol || seg.y + h > D + tol) continue;
        const rest = seg.w - w;
        if (rest > tol && rest < minSide - tol) continue;
        const above = D - (seg.y + h);
        if (above > tol && above < minSide - tol) continue;
        const top = seg.y + h;
        const closes = rest <= tol ? 2 : 0;
        const aligns = Math.abs(top - leftY) <= tol || Math.abs(top - rightY) <= tol || above <= tol ? 1 : 0;
        cands.push({ g, w, h, score: closes + aligns });
      }
    }
    cands.sort((p, q) => q.score - p.score || q.w * q.h - p.w * p.h);
    for (const c of cands) {
      const p = c.g.pieces[c.g.left - 1];
      c.g.left--;
      massLeft -= p.mass;
      placed.push({ ref: p.ref, x: seg.x, y: seg.y, w: c.w, h: c.h, rotated: Math.abs(c.w - p.w) > 1e-9 });
      if (dfs(advance(sky, i, c.w, c.h, D, tol))) return true;
      placed.pop();
      massLeft += p.mass;
      c.g.left++;
      if (work > opts.workBudget) return false;
    }
    return false;
  };

  const ok = dfs([{ x: 0, w: W, y: 0 }]);
  return { placements: ok ? placed : null, nodes, work };
}

/** Skyline after a w×h piece goes on the left end of segment i; near-equal levels merge upwards. */
function advance(sky: Segment[], i: number, w: number, h: number, D: number, tol: number): Segment[] {
  const seg = sky[i];
  const out: Segment[] = sky.slice(0, i);
  let top = seg.y + h;
  if (D - top <= tol) top = Math.max(top, D);
  const rest = seg.w - w;
  if (rest <= tol) {
    out.push({ x: seg.x, w: seg.w, y: top });
  } else {
    out.push({ x: seg.x, w, y: top });
    out.push({ x: seg.x + w, w: rest, y: seg.y });
  }
  for (let k = i + 1; k < sky.length; k++) out.push({ ...sky[k] });
  const merged: Segment[] = [];
  for (const s of out) {
    const last = merged[merged.length - 1];
    if (last && Math.abs(last.y - s.y) <= tol) {
      last.w = s.x + s.w - last.x;
      last.y = Math.max(last.y, s.y);
    } else {
      merged.push({ ...s });
    }
  }
  return merged;
}

export interface PackAllOptions {
  tol: number;
  /** Piece-group evaluations allowed, as in fillTrayExactly. */
  workBudget: number;
  /** Asked every 256 nodes; true ends the search as if the budget were spent (a caller's deadline). */
  stop?: () => boolean;
}

/**
 * Places every piece of `pieces` on one W×D tray, or reports that it found no way within the
 * budget. The same skyline search as fillTrayExactly, with one more branch: the lowest segment
 * may be left empty up to the lower of its neighbours, as long as the area left empty so far
 * stays within the tray's spare area (W·D − Σ piece area). With no spare area this is the
 * waste-free search; with a little it finds the tight trays that greedy rules miss (pieces cut
 * from a full tray and then trimmed, or the 99 %-full trays the area bound asks for). Bottom-left
 * skyline placement with bounded waste follows the skyline branch-and-bound of the strip-packing
 * literature, e.g. L. Wei, W.-C. Oon, W. Zhu & A. Lim, "A skyline heuristic for the 2D rectangular
 * packing and strip packing problems", EJOR 215(2):337–346 (2011) [from memory]. Not complete
 * (a packing whose pieces cannot be built bottom-left in this order is not found), so a null
 * answer means "not found", never "impossible".
 */
export function packAllOnTray<T>(W: number, D: number, pieces: readonly TilePiece<T>[], opts: PackAllOptions): TileSearchResult<T> {
  const { tol } = opts;
  const { groups, totalArea, misfits } = groupBySize(W, D, pieces, tol);
  if (misfits > 0) return { placements: null, nodes: 0, work: 0 };
  const spare = W * D - totalArea + tol * (W + D);
  if (spare < 0) return { placements: null, nodes: 0, work: 0 };
  let nodes = 0;
  let work = 0;
  let waste = 0;
  let remaining = pieces.length;
  const placed: TilePlacement<T>[] = [];

  const budget = opts.workBudget;
  const dfs = (sky: Segment[]): boolean => {
    if (remaining === 0) return true;
    nodes++;
    work += groups.length;
    if ((nodes & 255) === 0 && opts.stop?.()) work = budget + 1;
    if (work > budget) return false;
    const i = lowestOpen(sky, D, tol);
    if (i < 0) return false;
    const seg = sky[i];
    const leftY = i > 0 ? sky[i - 1].y : Infinity;
    const rightY = i < sky.length - 1 ? sky[i + 1].y : Infinity;
    const cands: { g: Group<T>; w: number; h: number; score: number }[] = [];
    for (const g of groups) {
      if (g.left === 0) continue;
      for (let o = 0; o < 2; o++) {
        if (o === 1 && Math.abs(g.a - g.b) <= 1e-9) break;
        const w = o === 0 ? g.a : g.b;
        const h = o === 0 ? g.b : g.a;
        if (w > seg.w + tol || seg.y + h > D + tol) continue;
        const top = seg.y + h;
        const closes = seg.w - w <= tol ? 2 : 0;
        const aligns = Math.abs(top - leftY) <= tol || Math.abs(top - rightY) <= tol || D - top <= tol ? 1 : 0;
        cands.push({ g, w, h, score: closes + aligns });
      }
    }
    cands.sort((p, q) => q.score - p.score || q.w * q.h - p.w * p.h || q.w - p.w);
    for (const c of cands) {
      const p = c.g.pieces[c.g.left - 1];
      c.g.left--;
      remaining--;
      placed.push({ ref: p.ref, x: seg.x, y: seg.y, w: c.w, h: c.h, rotated: Math.abs(c.w - p.w) > 1e-9 });
      if (dfs(advance(sky, i, c.w, c.h, D, tol))) return true;
      placed.pop();
      remaining++;
      c.g.left++;
      if (work > budget) return false;
    }
    // Leave the segment empty up to its lower neighbour (or the tray's far edge when it spans the tray).
    const raise = Math.min(leftY, rightY, D);
    const lost = seg.w * (raise - seg.y);
    if (waste + lost > spare) return false;
    waste += lost;
    const next = sky.map((s) => ({ ...s }));
    next[i].y = raise;
    const merged: Segment[] = [];
    for (const s of next) {
      const last = merged[merged.length - 1];
      if (last && Math.abs(last.y - s.y) <= tol) {
        last.w = s.x + s.w - last.x;
        last.y = Math.max(last.y, s.y);
      } else {
        merged.push(s);
      }
    }
    const ok = dfs(merged);
    waste -= lost;
    return ok;
  };

  const ok = dfs([{ x: 0, w: W, y: 0 }]);
  return { placements: ok ? placed : null, nodes, work };
}
