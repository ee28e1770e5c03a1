import { describe, expect, it } from "vitest";
import { sampleStandardDeviation, sampleVariance as ssSampleVariance, mean as ssMean } from "simple-statistics";
import { sampleStdDev, sampleVariance, welfordFrom, welfordMerge } from "@/lib/process/calibration";
import { studentTCdf, studentTQuantile } from "@/lib/process/student-t";

function twoPass(xs: number[]) {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  const v = xs.reduce((a, b) => a + (b - m) ** 2, 0) / (xs.length - 1);
  return { mean: m, variance: v };
}

// Welford, "Note on a method for calculating corrected sums of squares and products",
// Technometrics 4(3), 1962.
describe("Welford's online algorithm", () => {
  const samples = [0.1612, 0.1587, 0.1631, 0.1599, 0.1604, 0.1622, 0.1578, 0.1615, 0.1609, 0.1593];

  it("agrees with a two-pass computation", () => {
    const w = welfordFrom(samples);
    const t = twoPass(samples);
    expect(w.count).toBe(10);
    expect(w.mean).toBeCloseTo(t.mean, 15);
    expect(sampleVariance(w)!).toBeCloseTo(t.variance, 15);
  });

  it("agrees with simple-statistics", () => {
    const w = welfordFrom(samples);
    expect(w.mean).toBeCloseTo(ssMean(samples), 15);
    expect(sampleVariance(w)!).toBeCloseTo(ssSampleVariance(samples), 15);
    expect(sampleStdDev(w)!).toBeCloseTo(sampleStandardDeviation(samples), 14);
  });

  it("stays accurate with a large offset, where Σx² − n·mean² cancels", () => {
    const shifted = samples.map((x) => x + 1e7);
    const w = welfordFrom(shifted);
    const naive =
      (shifted.reduce((a, b) => a + b * b, 0) - shifted.length * (shifted.reduce((a, b) => a + b, 0) / shifted.length) ** 2) /
      (shifted.length - 1);
    // The two-pass value over the same shifted doubles is the reference (the shift itself
    // rounds each sample by up to 1e-9, so comparing with the unshifted data would not be fair).
    const truth = twoPass(shifted).variance;
    expect(Math.abs(sampleVariance(w)! - truth) / truth).toBeLessThan(1e-6);
    expect(Math.abs(naive - truth) / truth).toBeGreaterThan(1e-2);
  });

  it("merging two halves equals one pass over all", () => {
    const all = welfordFrom(samples);
    const merged = welfordMerge(welfordFrom(samples.slice(0, 3)), welfordFrom(samples.slice(3)));
    expect(merged.count).toBe(all.count);
    expect(merged.mean).toBeCloseTo(all.mean, 15);
    expect(merged.m2).toBeCloseTo(all.m2, 15);
  });
});

// Student t quantiles against the standard printed t table (e.g. NIST/SEMATECH e-Handbook of
// Statistical Methods, §1.3.6.7.2; values from memory of that table, three decimals).
describe("Student t quantiles vs tables", () => {
  const table: Array<[p: number, df: number, t: number]> = [
    [0.975, 9, 2.262],
    [0.975, 1, 12.706],
    [0.975, 2, 4.303],
    [0.975, 5, 2.571],
    [0.975, 10, 2.228],
    [0.975, 30, 2.042],
    [0.975, 120, 1.98],
    [0.95, 10, 1.812],
    [0.9, 3, 1.638],
    [0.99, 20, 2.528],
    [0.995, 5, 4.032],
  ];
  it.each(table)("t(%f, %i) = %f", (p, df, t) => {
    expect(studentTQuantile(p, df)).toBeCloseTo(t, 3);
    expect(studentTQuantile(1 - p, df)).toBeCloseTo(-t, 3);
  });

  it("closed forms: ν = 1 is Cauchy, ν = 2 has t = (2p − 1)·√(2/(4p(1 − p)))", () => {
    for (const p of [0.6, 0.75, 0.9, 0.99]) {
      expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 9);
      expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) * Math.sqrt(2 / (4 * p * (1 - p))), 9);
    }
  });

  it("the CDF inverts the quantile", () => {
    for (const df of [1, 3, 9, 40]) {
      for (const p of [0.01, 0.2, 0.5, 0.8, 0.975]) expect(studentTCdf(studentTQuantile(p, df), df)).toBeCloseTo(p, 10);
    }
  });
});
