// Lower bounds on the number of trays from dual-feasible functions, valid when pieces may turn 90°.
//
// A dual-feasible function (DFF) u: [0, 1] → [0, 1] satisfies Σ u(x_i) ≤ 1 whenever Σ x_i ≤ 1.
// S.P. Fekete & J. Schepers, "New classes of fast lower bounds for bin packing problems",
// Mathematical Programming 91:11–31 (2001), and "A general framework for bounds for
// higher-dimensional orthogonal packing problems", Math. Methods of Operations Research
// 60:311–329 (2004) [both from memory] show that for DFFs u1, u2 any set of rectangles that fits
// a W×D tray has Σ u1(w/W)·u2(d/D) ≤ 1, so ⌈Σ u1(w/W)·u2(d/D)⌉ trays are needed.
//
// With rotation the piece may lie as w×d or d×w, so each piece counts with the smaller of its two
// orientations (only those that fit the tray): min(u1(w/W)u2(d/D), u1(d/W)u2(w/D)). Whichever way
// the packing turns it, the tray's sum is at least the sum of these minima, so the bound stays
// valid for the rotation-allowed problem. With several furnaces a piece counts with the smallest
// value over the trays that can take it, which keeps every tray's sum ≤ 1 whatever furnace it is on.
//
// The functions used (as defined in the papers above and in the survey of F. Clautiaux, C. Alves
// & J. Valério de Carvalho, "A survey of dual-feasible and superadditive functions", Annals of
// Operations Research 179:317–342 (2010) [from memory]):
//   identity                 u(x) = x
//   U^ε, 0 < ε ≤ 1/2         u(x) = 1 if x > 1 − ε; x if ε ≤ x ≤ 1 − ε; 0 if x < ε
//   u^(k), k ≥ 1              u(x) = x if (k+1)x is an integer, else ⌊(k+1)x⌋ / k
//   and the compositions u^(k)∘U^ε (a composition of DFFs is a DFF).
// u^(1) on both axes counts the pieces over half the tray both ways (one per tray).

import { ceilWithSlack, martelloTothL2 } from "./one-dimensional";
import { GEOMETRY_EPS } from "./rectangles";

export type Dff = (x: number) => number;

/** Float slack on the integrality test of u^(k): a near-integer is taken at the smaller value. */
const INT_EPS = 1e-9;

export const identityDff: Dff = (x) => x;

export function epsilonDff(eps: number): Dff {
  return (x) => (x > 1 - eps ? 1 : x < eps ? 0 : x);
}

export function stepDff(k: number): Dff {
  return (x) => {
    const y = (k + 1) * x;
    const r = Math.round(y);
    // Within float noise of an integer we cannot tell "exactly integral" (u = x) from "just below"
    // (u = (r−1)/k) or "just above" (u = r/k); the smallest of the three never overstates u.
    if (Math.abs(y - r) <= INT_EPS) return r === 0 ? 0 : Math.min(x, (r - 1) / k);
    return Math.floor(y) / k;
  };
}

export interface ShapeItem {
  /** Piece sizes per furnace, one orientation; the bound also tries the turned one. */
  w: number;
  h: number;
  /** Trays (W×D) that can take the piece. */
  trays: readonly { W: number; D: number }[];
}

/** The family of functions tried on each axis: identity, U^ε for ε among the pieces' sides, u^(k), and u^(k)∘U^ε. */
function family(epsilons: readonly number[], maxK: number): Dff[] {
  const out: Dff[] = [identityDff];
  for (let k = 1; k <= maxK; k++) out.push(stepDff(k));
  for (const e of epsilons) {
    const ue = epsilonDff(e);
    out.push(ue);
    for (const k of [1, 2, 3]) {
      const uk = stepDff(k);
      out.push((x) => uk(ue(x)));
    }
  }
  return out;
}

/** Up to `limit` values spread over the sorted distinct values (all of them when few). */
function spread(values: number[], limit: number): number[] {
  const distinct = [...new Set(values.map((v) => Math.round(v * 1e9) / 1e9))].sort((a, b) => a - b);
  if (distinct.length <= limit) return distinct;
  const out: number[] = [];
  for (let i = 0; i < limit; i++) out.push(distinct[Math.floor((i * (distinct.length - 1)) / (limit - 1))]);
  return [...new Set(out)];
}

/**
 * Fewest trays for `items` by the best pair of dual-feasible functions tried (0 for no items).
 * The work grows with the square of the family size; `effort` caps the ε values per axis.
 */
export function dffTrayBound(items: readonly ShapeItem[], effort = 24): number {
  if (items.length === 0) return 0;
  // Normalised sides, per item and eligible tray, in both orientations; ε candidates from the
  // sides ≤ 1/2, where U^ε changes.
  type Orient = { x: number; y: number }[];
  const orients: Orient[] = [];
  const epsX: number[] = [];
  const epsY: number[] = [];
  for (const it of items) {
    const o: Orient = [];
    for (const t of it.trays) {
      for (const [a, b] of [
        [it.w, it.h],
        [it.h, it.w],
      ] as const) {
        const x = a / t.W;
        const y = b / t.D;
        if (x > 1 + 1e-9 || y > 1 + 1e-9) continue;
        o.push({ x: Math.min(1, x), y: Math.min(1, y) });
        if (x <= 0.5) epsX.push(x);
        if (y <= 0.5) epsY.push(y);
      }
    }
    orients.push(o);
  }
  const fx = family(spread(epsX, effort), 6);
  const fy = family(spread(epsY, effort), 6);
  // Precompute every function at every point it is needed.
  let best = 0;
  const valX = fx.map((u) => orients.map((o) => Float64Array.from(o.map((p) => u(p.x)))));
  const valY = fy.map((u) => orients.map((o) => Float64Array.from(o.map((p) => u(p.y)))));
  for (let a = 0; a < fx.length; a++) {
    const vx = valX[a];
    for (let b = 0; b < fy.length; b++) {
      const vy = valY[b];
      let sum = 0;
      for (let i = 0; i < orients.length; i++) {
        const ox = vx[i];
        const oy = vy[i];
        let m = Infinity;
        for (let k = 0; k < ox.length; k++) {
          const v = ox[k] * oy[k];
          if (v < m) m = v;
        }
        if (m !== Infinity) sum += m;
      }
      // Each term may carry float noise of about 1e-15; the slack keeps 2.0000000001 at 2.
      const lb = ceilWithSlack(sum - 1e-9 * orients.length);
      if (lb > best) best = lb;
    }
  }
  return best;
}

/**
 * A Martello–Toth L2 style bound on trays for pieces that may turn, all on trays of one size W×D
 * (S = max(W, D)). For q in (0, S/2]: J1 = pieces whose short side exceeds S − q (the strips they
 * leave are thinner than q), J2 = pieces whose short side lies in (S/2, S − q] (no two of them
 * share a tray), J3 = pieces whose short side lies in [q, S/2] (they cannot join a J1 piece, and
 * beside a J2 piece they have at most its tray's leftover area). Then trays ≥ |J1| + |J2| +
 * ⌈(area(J3) − Σ_{J2} (W·D − area)) / (W·D)⌉⁺. This is the rotation-invariant form (short side
 * only) of the bound L2 of S. Martello & D. Vigo, "Exact solution of the two-dimensional finite bin
 * packing problem", Management Science 44(3):388–399 (1998), as adapted to turning pieces by
 * M. Dell'Amico, S. Martello & D. Vigo, "A lower bound for the non-oriented two-dimensional bin
 * packing problem", Discrete Applied Mathematics 118:13–24 (2002) [both from memory; the
 * argument above is self-contained].
 */
export function shortSideTrayBound(pieces: readonly { w: number; h: number }[], W: number, D: number): number {
  if (pieces.length === 0) return 0;
  const S = Math.max(W, D);
  const A = W * D;
  const eps = 1e-9;
  const short = pieces.map((p) => ({ s: Math.min(p.w, p.h), a: p.w * p.h }));
  const qs = new Set<number>([eps]);
  for (const p of short) if (p.s <= S / 2 + eps) qs.add(p.s);
  let best = 0;
  for (const q of qs) {
    let j1 = 0;
    let j2 = 0;
    let spare = 0;
    let a3 = 0;
    for (const p of short) {
      if (p.s > S - q + eps) j1++;
      else if (p.s > S / 2 + eps) {
        j2++;
        spare += A - p.a;
      } else if (p.s >= q - eps) a3 += p.a;
    }
    const extra = Math.max(0, ceilWithSlack((a3 - spare) / A - 1e-9));
    best = Math.max(best, j1 + j2 + extra);
  }
  return best;
}

/**
 * Enlarged-area bound for pieces that may turn, all on trays of one size W×D.
 *
 * Fix q ≥ 0 and keep only the pieces whose both sides are at least q (dropping pieces never needs
 * more trays). A piece lying as a×b (a along W) claims the region X × Y, where X is the whole
 * width when a > W − q (else its own x-range) and Y the whole depth when b > D − q (else its own
 * y-range). In one tray the claimed regions of two kept pieces never overlap: the pieces lie apart
 * along x or along y, say x; their claimed x-ranges can then only meet if one of them spans the
 * width, a_k > W − q, and then a_l ≤ W − a_k < q, which no kept piece has. So every tray holds
 * claimed areas e = (a > W − q ? W : a)·(b > D − q ? D : b) summing to at most W·D, a piece counted
 * with the smaller e of the orientations that fit — a one-dimensional bin-packing instance with
 * capacity W·D, to which Martello & Toth's L2 applies. Pieces over half the tray both ways in
 * every fitting orientation cover the tray's centre, so no two share a tray: with k of them, the
 * trays needed are also k + ⌈(Σ e of the others − Σ (W·D − e) of these k) / (W·D)⌉⁺.
 *
 * The claimed area is the product of the dual-feasible functions U^ε of Fekete & Schepers on both
 * axes, and bounding the transformed sizes with a one-dimensional bound in place of their plain sum
 * follows J. Carlier, F. Clautiaux & A. Moukrim, "New reduction procedures and lower bounds for
 * the two-dimensional bin packing problem with fixed orientation", Computers & Operations Research
 * 34(8):2223–2250 (2007), and the big-piece count the bound L2 of Martello & Vigo (1998) [all from
 * memory; the argument above is self-contained]. It is what lifts the bound on pieces that are long
 * one way (the tall and wide classes of Martello & Vigo), whose strips beside them nothing can use.
 */
export function claimedAreaTrayBound(pieces: readonly { w: number; h: number }[], W: number, D: number, maxQ = 128): number {
  if (pieces.length === 0) return 0;
  const eps = GEOMETRY_EPS;
  const A = W * D;
  const sides: number[] = [0];
  for (const p of pieces) sides.push(p.w, p.h);
  const qs = spread(sides, maxQ);
  let best = 0;
  const e: number[] = [];
  for (const q of qs) {
    e.length = 0;
    let bigCount = 0;
    let bigSpare = 0;
    let restSum = 0;
    for (const p of pieces) {
      if (Math.min(p.w, p.h) < q - eps) continue;
      let v = Infinity;
      let big = true;
      for (const [a, b] of [
        [p.w, p.h],
        [p.h, p.w],
      ] as const) {
        if (a > W + eps || b > D + eps) continue;
        v = Math.min(v, (a > W - q + eps ? W : Math.min(a, W)) * (b > D - q + eps ? D : Math.min(b, D)));
        if (!(a > W / 2 + eps && b > D / 2 + eps)) big = false;
      }
      if (v === Infinity) continue;
      e.push(v);
      if (big) {
        bigCount++;
        bigSpare += A - v;
      } else restSum += v;
    }
    if (e.length === 0) continue;
    best = Math.max(best, martelloTothL2(e, A), bigCount + Math.max(0, ceilWithSlack((restSum - bigSpare) / A - 1e-9)));
  }
  return best;
}
