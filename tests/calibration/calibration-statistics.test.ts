import { describe, expect, it } from "vitest";
import * as ss from "simple-statistics";
import { calibrationPoints, factorOf, summarizeCalibration, MIN_SAMPLES_TO_APPLY, type CalibrationRow } from "@/lib/finishing/calibration";

// Ten inspections of one material: green and sintered sizes per axis. The statistics are
// checked against simple-statistics (an independent implementation) and against the formulas
// written out: mean shrinkage s̄, sample s.d. (n − 1), interval s̄ ± t(0.975, n − 1)·s/√n and
// factor f = 1/(1 − s̄) (German & Bose 1997; the "16 % → 1.19" scale-up example).
const shrinkX = [0.158, 0.161, 0.16, 0.163, 0.157, 0.162, 0.159, 0.16, 0.164, 0.156];
const shrinkY = [0.159, 0.16, 0.162, 0.158, 0.161, 0.16, 0.163, 0.157, 0.16, 0.16];
const shrinkZ = [0.175, 0.178, 0.172, 0.18, 0.176, 0.174, 0.177, 0.179, 0.173, 0.176];
const green = { x: 60, y: 40, z: 25 };

const rows: CalibrationRow[] = shrinkX.map((sx, i) => ({
  id: `i${i}`,
  unit_id: `u${i}`,
  serial: `S-${i}`,
  created_at: new Date(Date.UTC(2026, 2, 1 + i)),
  green_x_mm: green.x,
  green_y_mm: green.y,
  green_z_mm: green.z,
  sintered_x_mm: green.x * (1 - sx),
  sintered_y_mm: green.y * (1 - shrinkY[i]),
  sintered_z_mm: green.z * (1 - shrinkZ[i]),
  green_source: "measured",
}));

// Student t, 0.975 quantile, 9 degrees of freedom: 2.262 (standard t tables).
const T_975_9 = 2.262;
// 19 degrees of freedom (X and Y pooled, n = 20): 2.093 (standard t tables).
const T_975_19 = 2.093;

describe("realized shrinkage per axis from inspections", () => {
  it("gives one point per axis measured green and sintered, s = 1 − sintered/green", () => {
    const { points } = calibrationPoints(rows);
    expect(points).toHaveLength(30);
    const z = points.filter((p) => p.axis === "z").map((p) => p.shrinkage);
    z.forEach((s, i) => expect(s).toBeCloseTo(shrinkZ[i], 12));
  });

  it("matches simple-statistics for mean, sample s.d. and count on each axis", () => {
    const { calibration } = summarizeCalibration(rows, { shrink_xy: 0.15, shrink_z: 0.17 });
    for (const [axis, data] of [["x", shrinkX], ["y", shrinkY], ["z", shrinkZ]] as const) {
      const cal = calibration[axis]!;
      expect(cal.count).toBe(10);
      expect(cal.meanShrinkage).toBeCloseTo(ss.mean(data), 12);
      expect(cal.stdDev!).toBeCloseTo(ss.sampleStandardDeviation(data), 12);
    }
    // X and Y pool into the material's single in-plane value.
    const xy = [...shrinkX, ...shrinkY];
    expect(calibration.xy!.count).toBe(20);
    expect(calibration.xy!.meanShrinkage).toBeCloseTo(ss.mean(xy), 12);
    expect(calibration.xy!.stdDev!).toBeCloseTo(ss.sampleStandardDeviation(xy), 12);
  });

  it("puts a t interval on the mean and maps it to the factor", () => {
    const { calibration } = summarizeCalibration(rows, { shrink_xy: 0.15, shrink_z: 0.17 });
    const z = calibration.z!;
    const half = (T_975_9 * ss.sampleStandardDeviation(shrinkZ)) / Math.sqrt(10);
    // the t table gives 3 decimals, so agree to about 1e-3 relative on the half-width
    expect(z.interval!.halfWidth).toBeCloseTo(half, 6);
    expect(z.interval!.shrinkage[0]).toBeCloseTo(ss.mean(shrinkZ) - half, 6);
    expect(z.interval!.factor[1]).toBeCloseTo(1 / (1 - (ss.mean(shrinkZ) + half)), 6);
    expect(z.suggestedFactor).toBeCloseTo(1 / (1 - ss.mean(shrinkZ)), 12);
    const xy = calibration.xy!;
    const halfXy = (T_975_19 * ss.sampleStandardDeviation([...shrinkX, ...shrinkY])) / Math.sqrt(20);
    expect(xy.interval!.halfWidth).toBeCloseTo(halfXy, 6);
  });

  it("suggests the measured means once there are enough samples, and says when the current value lies outside", () => {
    const summary = summarizeCalibration(rows, { shrink_xy: 0.15, shrink_z: 0.176 });
    const xy = summary.suggestions.find((s) => s.axis === "xy")!;
    expect(xy.suggested).toBeCloseTo(ss.mean([...shrinkX, ...shrinkY]), 12);
    expect(xy.currentOutsideInterval).toBe(true); // 15 % against a measured 16 %
    const z = summary.suggestions.find((s) => s.axis === "z")!;
    expect(z.currentOutsideInterval).toBe(false); // 17.6 % sits inside the z interval
    expect(summary.applicable.xy).toBeCloseTo(xy.suggested, 12);
    const few = summarizeCalibration(rows.slice(0, MIN_SAMPLES_TO_APPLY - 1), { shrink_xy: 0.15, shrink_z: 0.17 });
    expect(few.inspections).toEqual({ xy: MIN_SAMPLES_TO_APPLY - 1, z: MIN_SAMPLES_TO_APPLY - 1 });
    expect(few.applicable).toEqual({});
    expect(few.suggestions.every((s) => !s.enoughData)).toBe(true);
  });

  it("reproduces the published scale-up example: 16 % → 1.19", () => {
    expect(factorOf(0.16)).toBeCloseTo(1.1905, 4);
    expect(factorOf(0.2)).toBeCloseTo(1.25, 12);
  });

  it("sets an implausible pair aside instead of failing the whole material", () => {
    const swapped: CalibrationRow = { ...rows[0], id: "bad", sintered_x_mm: 70 };
    const { points, rejected } = calibrationPoints([swapped]);
    expect(rejected).toEqual([expect.objectContaining({ inspection_id: "bad", axis: "x" })]);
    expect(points.map((p) => p.axis)).toEqual(["y", "z"]);
  });

  it("has nothing to suggest without data", () => {
    const empty = summarizeCalibration([], { shrink_xy: 0.15, shrink_z: 0.17 });
    expect(empty.points).toEqual([]);
    expect(empty.suggestions).toEqual([]);
  });
});
