// A material's yield: of the units that reached a verdict (done, or scrapped at any step), the
// share that came out good. The point estimate k/n sets how many units to start; the Wilson
// score interval shows how sure that is with few records, and unlike the normal ("Wald")
// interval it stays inside [0, 1] and is not degenerate at k = 0 or k = n.
// E. B. Wilson, "Probable inference, the law of succession, and statistical inference",
// J. American Statistical Association 22(158):209–212 (1927); also the NIST/SEMATECH
// e-Handbook of Statistical Methods, §7.2.4.1 (confidence interval for a proportion) [from memory].

import { ComputationError } from "@/lib/errors";

/** Two-sided 95 % normal quantile (Φ⁻¹(0.975)), as printed in standard normal tables. */
export const Z95 = 1.959963984540054;

export type WilsonInterval = { low: number; high: number; center: number };

export function wilsonInterval(successes: number, trials: number, z = Z95): WilsonInterval {
  if (!Number.isInteger(successes) || !Number.isInteger(trials) || trials <= 0 || successes < 0 || successes > trials) {
    throw new ComputationError(`a yield needs 0 ≤ good ≤ started and started > 0 (got ${successes} of ${trials})`, "yield");
  }
  const n = trials;
  const p = successes / n;
  const z2 = z * z;
  const denom = 1 + z2 / n;
  const center = (p + z2 / (2 * n)) / denom;
  const half = (z / denom) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n));
  // At k = 0 and k = n the bound is exactly 0 or 1; floating point would leave 1 − 1e-16.
  return { low: successes === 0 ? 0 : Math.max(0, center - half), high: successes === n ? 1 : Math.min(1, center + half), center };
}

export type MaterialYield = {
  good: number;
  scrapped: number;
  /** k/n, or the shop's fallback when nothing is recorded yet. */
  estimate: number;
  interval: WilsonInterval | null;
  source: "measured" | "fallback";
};

export function materialYield(good: number, scrapped: number, fallback: number): MaterialYield {
  const n = good + scrapped;
  if (n === 0) return { good, scrapped, estimate: fallback, interval: null, source: "fallback" };
  const estimate = good / n;
  // A material with no good unit yet would start infinitely many; the fallback stands in.
  if (estimate === 0) return { good, scrapped, estimate: fallback, interval: wilsonInterval(good, n), source: "fallback" };
  return { good, scrapped, estimate, interval: wilsonInterval(good, n), source: "measured" };
}

/** Units to start so that, at the expected yield, `requested` come out good. */
export function quantityToStart(requested: number, yieldEstimate: number): number {
  if (!(yieldEstimate > 0 && yieldEstimate <= 1)) throw new ComputationError("yield must lie in (0, 1]", "yield");
  // The epsilon keeps 9 / 0.9 = 10.000000000000002 at 10.
  return Math.ceil(requested / yieldEstimate - 1e-9);
}
