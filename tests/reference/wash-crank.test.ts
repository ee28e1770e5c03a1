import { describe, expect, it } from "vitest";
import {
  fickDiffusivityFromCalibration,
  fickRemainingFraction,
  fickSecondsToFraction,
  washKFromCalibration,
  washKFromDiffusivity,
  washMinutes,
} from "@/lib/process/wash";

// Crank, The Mathematics of Diffusion, 2nd ed., 1975, eq. 4.18 (plane sheet, both faces;
// equation number from memory). Worked example REFERENCES §4 [computed there, recomputed here].
describe("Crank eq. 4.18 worked example", () => {
  const hour = 3600;

  it("4 mm wall, 8 h to F = 0.10 ⇒ D_eff ≈ 1.178e-4 mm²/s", () => {
    expect(Math.log(8 / (Math.PI ** 2 * 0.1))).toBeCloseTo(2.09257, 5);
    const d = fickDiffusivityFromCalibration(4, 8 * hour, 0.1);
    expect(d).toBeCloseTo(1.178e-4, 7);
    // In SI: 1.18e-10 m²/s.
    expect(d * 1e-6).toBeCloseTo(1.18e-10, 12);
  });

  it("the full series gives F(8 h) = 0.1000", () => {
    const d = fickDiffusivityFromCalibration(4, 8 * hour, 0.1);
    expect(fickRemainingFraction(d, 2, 8 * hour)).toBeCloseTo(0.1, 4);
  });

  it("the series starts at 1 and falls monotonically", () => {
    const d = 1.178e-4;
    expect(fickRemainingFraction(d, 2, 0)).toBe(1);
    let last = 1;
    for (const t of [1, 60, 600, 3600, 7200, 28800, 86400]) {
      const f = fickRemainingFraction(d, 2, t);
      expect(f).toBeLessThan(last);
      last = f;
    }
  });

  it("H² scaling: 2 mm → 2 h, 3 mm → 4.5 h, 6 mm → 18 h, 8 mm → 32 h, 10 mm → 50 h", () => {
    const k = washKFromCalibration(4, 8 * 60);
    const expected: Array<[number, number]> = [
      [2, 2],
      [3, 4.5],
      [6, 18],
      [8, 32],
      [10, 50],
    ];
    for (const [wall, hours] of expected) {
      expect(washMinutes({ thickestWallMm: wall, kMinPerMm2: k })).toBeCloseTo(hours * 60, 9);
    }
    const d = fickDiffusivityFromCalibration(4, 8 * hour, 0.1);
    expect(fickSecondsToFraction(d, 3, 0.1) / hour).toBeCloseTo(18, 9);
    // The same k from the diffusivity: t = k·H².
    expect(washKFromDiffusivity(d, 0.1)).toBeCloseTo(k, 9);
  });
});
