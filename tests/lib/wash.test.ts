import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  fickRemainingFraction,
  fickSecondsToFraction,
  massLossCheck,
  washBatchMinutes,
  washKFromCalibration,
  washMinutes,
} from "@/lib/process/wash";

describe("wash time", () => {
  it("t = k·h² + t_min", () => {
    expect(washMinutes({ thickestWallMm: 4, kMinPerMm2: 30, minMinutes: 60 })).toBe(540);
    expect(washMinutes({ thickestWallMm: 1, kMinPerMm2: 30 })).toBe(30);
  });

  it("a batch lasts as long as its slowest unit", () => {
    const r = washBatchMinutes([
      { thickestWallMm: 2, kMinPerMm2: 30, minMinutes: 60 },
      { thickestWallMm: 6, kMinPerMm2: 20 },
      { thickestWallMm: 5, kMinPerMm2: 30 },
    ]);
    expect(r.minutes).toBe(750);
    expect(r.slowestIndex).toBe(2);
    expect(() => washBatchMinutes([])).toThrow(ComputationError);
  });

  it("rejects impossible inputs", () => {
    expect(() => washMinutes({ thickestWallMm: 0, kMinPerMm2: 30 })).toThrow(ComputationError);
    expect(() => washMinutes({ thickestWallMm: 3, kMinPerMm2: -1 })).toThrow(ComputationError);
    expect(() => washKFromCalibration(4, 30, 60)).toThrow(ComputationError);
  });
});

describe("mass-loss check", () => {
  it("passes at or above the minimum", () => {
    const r = massLossCheck(100, 95.5, 0.04);
    expect(r.lossFraction).toBeCloseTo(0.045, 12);
    expect(r.passed).toBe(true);
    expect(r.shortBy).toBe(0);
    expect(massLossCheck(100, 96, 0.04).passed).toBe(true);
  });

  it("fails with the shortfall", () => {
    const r = massLossCheck(100, 97, 0.04);
    expect(r.passed).toBe(false);
    expect(r.shortBy).toBeCloseTo(0.01, 12);
    expect(r.shortByG).toBeCloseTo(1, 12);
  });

  it("brown heavier than green is an error", () => {
    expect(() => massLossCheck(100, 100.1, 0.04)).toThrow(/cannot add mass/);
    expect(() => massLossCheck(0, 0, 0.04)).toThrow(ComputationError);
    expect(() => massLossCheck(100, 90, 1.5)).toThrow(ComputationError);
  });
});

describe("Fickian series", () => {
  it("one-term inverse agrees with the full series once the first term dominates", () => {
    const d = 1e-4;
    for (const f of [0.5, 0.2, 0.05, 0.01]) {
      const t = fickSecondsToFraction(d, 2, f);
      expect(fickRemainingFraction(d, 2, t)).toBeCloseTo(f, f > 0.3 ? 2 : 6);
    }
  });

  it("early times follow √t (F ≈ 1 − 2·√(Dt/π)/l)", () => {
    const d = 1e-4;
    const l = 2;
    const t = 60;
    const early = 1 - (2 * Math.sqrt((d * t) / Math.PI)) / l;
    expect(fickRemainingFraction(d, l, t)).toBeCloseTo(early, 6);
  });

  it("rejects fractions outside the one-term range", () => {
    expect(() => fickSecondsToFraction(1e-4, 2, 0.9)).toThrow(ComputationError);
    expect(() => fickRemainingFraction(0, 2, 10)).toThrow(ComputationError);
    expect(() => fickRemainingFraction(1e-4, 2, -1)).toThrow(ComputationError);
  });
});
