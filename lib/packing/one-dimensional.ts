// One-dimensional bin-packing bounds and First Fit Decreasing. Any additive measure with a
// per-bin capacity (mass against a furnace load limit, footprint area against tray area) obeys
// these bounds, which is why the tray packer uses them for both.

import { ComputationError } from "@/lib/errors";

/** Relative slack so that float noise in sums (e.g. 2.0000000001 bins) does not add a bin. */
const CEIL_SLACK = 1e-9;

export function ceilWithSlack(x: number): number {
  return Math.ceil(x - CEIL_SLACK * Math.max(1, Math.abs(x)));
}

function checkInput(weights: readonly number[], capacity: number): void {
  if (!(capacity > 0) || !Number.isFinite(capacity)) {
    throw new ComputationError(`Bin capacity must be a positive number, got ${capacity}`, "capacity");
  }
  for (const w of weights) {
    if (!(w >= 0) || !Number.isFinite(w)) {
      throw new ComputationError(`Item sizes must be finite and non-negative, got ${w}`, "weights");
    }
    if (w > capacity * (1 + CEIL_SLACK)) {
      throw new ComputationError(`Item of size ${w} exceeds the bin capacity ${capacity}`, "weights");
    }
  }
}

/** Continuous bound L1 = ⌈Σw / C⌉. */
export function continuousBound(weights: readonly number[], capacity: number): number {
  checkInput(weights, capacity);
  let sum = 0;
  for (const w of weights) sum += w;
  return sum === 0 ? 0 : ceilWithSlack(sum / capacity);
}

/**
 * Martello & Toth's L2 (Discrete Applied Mathematics 28, 1990 [from memory]): for α in [0, C/2],
 * J1 = {w > C−α}, J2 = {C−α ≥ w > C/2}, J3 = {C/2 ≥ w ≥ α};
 * L(α) = |J1| + |J2| + max(0, ⌈(ΣJ3 − (|J2|·C − ΣJ2)) / C⌉), L2 = max over α.
 * Only α equal to 0 or to an item size ≤ C/2 can change the sets, so those are the ones tried.
 */
export function martelloTothL2(weights: readonly number[], capacity: number): number {
  checkInput(weights, capacity);
  const w = weights.filter((x) => x > 0).sort((a, b) => b - a);
  const n = w.length;
  if (n === 0) return 0;
  const prefix = new Float64Array(n + 1);
  for (let i = 0; i < n; i++) prefix[i + 1] = prefix[i] + w[i];
  // Number of items strictly greater than t (w is sorted descending).
  const countAbove = (t: number): number => {
    let lo = 0;
    let hi = n;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (w[mid] > t) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  // Number of items ≥ t.
  const countAtLeast = (t: number): number => {
    let lo = 0;
    let hi = n;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (w[mid] >= t) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const half = capacity / 2;
  const alphas = new Set<number>([0]);
  for (const x of w) if (x <= half) alphas.add(x);
  const nAboveHalf = countAbove(half);
  let best = 0;
  for (const alpha of alphas) {
    const j1 = countAbove(capacity - alpha);
    const j2End = nAboveHalf; // items > C/2 end here
    const j2Count = j2End - j1;
    const j2Sum = prefix[j2End] - prefix[j1];
    const j3End = alpha === 0 ? n : countAtLeast(alpha);
    const j3Sum = prefix[j3End] - prefix[j2End];
    const spare = j2Count * capacity - j2Sum;
    const extra = Math.max(0, ceilWithSlack((j3Sum - spare) / capacity));
    best = Math.max(best, j1 + j2Count + extra);
  }
  return best;
}

/** First Fit Decreasing. Returns the bins as lists of item indices, in opening order. */
export function firstFitDecreasing(weights: readonly number[], capacity: number): number[][] {
  checkInput(weights, capacity);
  const order = weights.map((_, i) => i).sort((a, b) => weights[b] - weights[a] || a - b);
  const bins: number[][] = [];
  const load: number[] = [];
  const slack = capacity * CEIL_SLACK;
  for (const i of order) {
    let k = 0;
    while (k < bins.length && load[k] + weights[i] > capacity + slack) k++;
    if (k === bins.length) {
      bins.push([]);
      load.push(0);
    }
    bins[k].push(i);
    load[k] += weights[i];
  }
  return bins;
}
