import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  calibrateMaterial,
  EMPTY_STATS,
  realizedShrinkage,
  sampleStdDev,
  suggestShrinkageUpdate,
  summarizeAxis,
  welfordAdd,
  welfordFrom,
  welfordMerge,
} from "@/lib/process/calibration";

describe("realized shrinkage", () => {
  it("s = 1 − sintered/green", () => {
    expect(realizedShrinkage(30, 25.5)).toBeCloseTo(0.15, 12);
  });

  it("swapped or absurd readings throw", () => {
    expect(() => realizedShrinkage(25.5, 30)).toThrow(/swapped/);
    expect(() => realizedShrinkage(30, 30)).toThrow(ComputationError);
    expect(() => realizedShrinkage(0, 3)).toThrow(ComputationError);
  });
});

describe("Welford summaries", () => {
  it("order does not matter and merging is associative", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: 0.1, max: 0.25, noNaN: true }), { minLength: 2, maxLength: 40 }), (xs) => {
        const a = welfordFrom(xs);
        const b = welfordFrom([...xs].reverse());
        expect(b.mean).toBeCloseTo(a.mean, 12);
        expect(b.m2).toBeCloseTo(a.m2, 12);
        const k = Math.floor(xs.length / 2);
        const m = welfordMerge(welfordFrom(xs.slice(0, k)), welfordFrom(xs.slice(k)));
        expect(m.mean).toBeCloseTo(a.mean, 12);
        expect(m.m2).toBeCloseTo(a.m2, 12);
      }),
    );
  });

  it("one sample has no spread; non-finite samples are refused", () => {
    const one = welfordAdd(EMPTY_STATS, 0.15);
    expect(sampleStdDev(one)).toBeUndefined();
    expect(summarizeAxis(one).interval).toBeUndefined();
    expect(() => welfordAdd(one, NaN)).toThrow(ComputationError);
    expect(() => summarizeAxis(EMPTY_STATS)).toThrow(ComputationError);
  });
});

describe("material calibration", () => {
  // Ten X readings around 16 % and ten Z readings around 19 %.
  const xs = [0.1612, 0.1587, 0.1631, 0.1599, 0.1604, 0.1622, 0.1578, 0.1615, 0.1609, 0.1593];
  const zs = [0.1912, 0.1887, 0.1931, 0.1899, 0.1904, 0.1922, 0.1878, 0.1915, 0.1909, 0.1893];
  const samples = xs.map((s, i) => ({
    x: { green: 50, sintered: 50 * (1 - s) },
    z: { green: 20, sintered: 20 * (1 - zs[i]) },
  }));

  it("mean, spread, factor and a t interval (t(0.975, 9) = 2.262)", () => {
    const c = calibrateMaterial(samples);
    const mean = xs.reduce((a, b) => a + b, 0) / xs.length;
    const sd = Math.sqrt(xs.reduce((a, b) => a + (b - mean) ** 2, 0) / 9);
    expect(c.x!.count).toBe(10);
    expect(c.x!.meanShrinkage).toBeCloseTo(mean, 12);
    expect(c.x!.stdDev!).toBeCloseTo(sd, 12);
    expect(c.x!.suggestedFactor).toBeCloseTo(1 / (1 - mean), 12);
    const half = (2.262 * sd) / Math.sqrt(10);
    expect(c.x!.interval!.halfWidth).toBeCloseTo(half, 5);
    expect(c.x!.interval!.factor[0]).toBeCloseTo(1 / (1 - (mean - half)), 5);
    expect(c.x!.interval!.factor[1]).toBeCloseTo(1 / (1 - (mean + half)), 5);
    expect(c.y).toBeUndefined();
    expect(c.xy!.count).toBe(10);
    expect(c.z!.meanShrinkage).toBeCloseTo(mean + 0.03, 12);
  });

  it("suggests new material values and says whether the current one is outside the interval", () => {
    const c = calibrateMaterial(samples);
    const s = suggestShrinkageUpdate({ shrinkXY: 0.15, shrinkZ: 0.19 }, c);
    const xy = s.find((x) => x.axis === "xy")!;
    const z = s.find((x) => x.axis === "z")!;
    expect(xy.currentOutsideInterval).toBe(true);
    expect(xy.change).toBeCloseTo(c.xy!.meanShrinkage - 0.15, 12);
    expect(z.currentOutsideInterval).toBe(false);
    expect(z.enoughData).toBe(true);
    expect(suggestShrinkageUpdate({ shrinkXY: 0.15, shrinkZ: 0.19 }, c, 20)[0].enoughData).toBe(false);
  });
});
