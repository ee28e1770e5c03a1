import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  fitsBuildVolume,
  greenFromSintered,
  inverseScaleUp,
  scaleFactor,
  scaleUp,
  shrinkageFromDensities,
  shrinkageFromFactor,
  shrinkageFromMaterial,
  shrinkageFromSolidsLoading,
  sinteredFromGreen,
  skeletonDensityFromFeedstock,
} from "@/lib/process/scale-up";

const length = fc.double({ min: 0.1, max: 1000, noNaN: true });
const stock = fc.double({ min: 0, max: 5, noNaN: true });
const shrink = fc.double({ min: 0.001, max: 0.499, noNaN: true });
const axes = fc.record({ x: length, y: length, z: length });
const stocks = fc.record({ x_neg: stock, x_pos: stock, y_neg: stock, y_pos: stock, z_neg: stock, z_pos: stock });
const shrinks = fc.record({ xy: shrink, z: shrink });

describe("scale-up", () => {
  it("green = (nominal + both faces' stock) × 1/(1 − s), per axis", () => {
    const r = scaleUp({
      nominal: { x: 40, y: 20, z: 10 },
      stock: { x_neg: 0.3, x_pos: 0.2, y_neg: 0, y_pos: 0, z_neg: 0.5, z_pos: 0 },
      shrink: { xy: 0.16, z: 0.2 },
    });
    expect(r.x.withStock).toBeCloseTo(40.5, 12);
    expect(r.x.green).toBeCloseTo(40.5 / 0.84, 12);
    expect(r.y.green).toBeCloseTo(20 / 0.84, 12);
    expect(r.z.green).toBeCloseTo(10.5 / 0.8, 12);
    expect(r.z.factor).toBeCloseTo(1.25, 12);
    expect(r.unit).toBe("mm");
  });

  it("stock defaults to zero", () => {
    const r = scaleUp({ nominal: { x: 1, y: 2, z: 3 }, shrink: { xy: 0.1, z: 0.1 } });
    expect(r.z.withStock).toBe(3);
  });

  it("scale-up ∘ inverse is the identity", () => {
    fc.assert(
      fc.property(axes, stocks, shrinks, (nominal, st, sh) => {
        const up = scaleUp({ nominal, stock: st, shrink: sh });
        const back = inverseScaleUp({ green: { x: up.x.green, y: up.y.green, z: up.z.green }, stock: st, shrink: sh });
        for (const a of ["x", "y", "z"] as const) {
          expect(back[a].nominal).toBeCloseTo(nominal[a], 9);
          expect(Number.isFinite(up[a].green)).toBe(true);
          expect(up[a].green).toBeGreaterThan(up[a].withStock);
        }
      }),
    );
  });

  it("green ↔ sintered and factor ↔ shrinkage are inverses", () => {
    fc.assert(
      fc.property(length, shrink, (l, s) => {
        expect(sinteredFromGreen(greenFromSintered(l, s), s)).toBeCloseTo(l, 9);
        expect(shrinkageFromFactor(scaleFactor(s))).toBeCloseTo(s, 12);
      }),
    );
  });

  it("no valid input produces NaN", () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0.3, max: 0.75, noNaN: true }),
        fc.double({ min: 0.9, max: 1, noNaN: true }),
        (phi, fs) => {
          const s = shrinkageFromSolidsLoading(phi, fs);
          expect(s).toBeGreaterThan(0);
          expect(s).toBeLessThan(0.5);
          expect(Number.isNaN(scaleFactor(s))).toBe(false);
        },
      ),
    );
  });

  it("invalid inputs throw ComputationError", () => {
    const bad = [NaN, Infinity, -1, 0, 0.5, 0.7, 16];
    fc.assert(
      fc.property(fc.constantFrom(...bad), axes, (s, nominal) => {
        expect(() => scaleFactor(s)).toThrow(ComputationError);
        expect(() => scaleUp({ nominal, shrink: { xy: s, z: 0.2 } })).toThrow(ComputationError);
        expect(() => scaleUp({ nominal, shrink: { xy: 0.15, z: s } })).toThrow(ComputationError);
      }),
    );
    expect(() => scaleUp({ nominal: { x: -1, y: 1, z: 1 }, shrink: { xy: 0.1, z: 0.1 } })).toThrow(ComputationError);
    expect(() =>
      scaleUp({ nominal: { x: 1, y: 1, z: 1 }, stock: { x_neg: -0.1 }, shrink: { xy: 0.1, z: 0.1 } }),
    ).toThrow(ComputationError);
    expect(() => shrinkageFromSolidsLoading(0.98, 0.97)).toThrow(/would not shrink/);
    expect(() => shrinkageFromSolidsLoading(0, 0.97)).toThrow(ComputationError);
    // φ = 0.1 would mean 1 − ∛(0.1/0.97) = 53 % shrinkage: outside (0, 0.5).
    expect(() => shrinkageFromSolidsLoading(0.1, 0.97)).toThrow(/below 0.5/);
  });

  it("a shrinkage written as a percentage is refused, not scaled", () => {
    expect(() => scaleFactor(16)).toThrow(/fraction, not a percentage/);
  });

  it("densities: the skeleton must be below the sintered density", () => {
    expect(() => shrinkageFromDensities(7.6, 7.5)).toThrow(/would not shrink/);
    expect(() => shrinkageFromDensities(0, 7.5)).toThrow(ComputationError);
    expect(() => skeletonDensityFromFeedstock(0.3, 0.6, 0.95)).toThrow(/too low/);
  });

  it("material shrinkage from its solids loading and densities", () => {
    expect(shrinkageFromMaterial({ solidsLoading: 0.6, sinteredDensity: 7.55, theoreticalDensity: 7.55 / 0.97 })).toBeCloseTo(
      1 - Math.cbrt(0.6 / 0.97),
      12,
    );
    expect(() => shrinkageFromMaterial({ solidsLoading: 0.6, sinteredDensity: 8, theoreticalDensity: 7.8 })).toThrow(
      /exceeds the theoretical/,
    );
  });

  it("inverse scale-up refuses stock larger than the part", () => {
    expect(() =>
      inverseScaleUp({ green: { x: 1, y: 10, z: 10 }, stock: { x_neg: 1, x_pos: 1 }, shrink: { xy: 0.15, z: 0.15 } }),
    ).toThrow(/stock/);
  });
});

describe("fitsBuildVolume", () => {
  const volume = { x: 300, y: 200, z: 150 };

  it("fits straight when it can", () => {
    const r = fitsBuildVolume({ x: 250, y: 150, z: 100 }, volume, 5);
    expect(r.fits).toBe(true);
    expect(r.rotated).toBe(false);
    expect(r.failing).toEqual([]);
  });

  it("swaps X and Y when only the quarter turn fits", () => {
    const r = fitsBuildVolume({ x: 150, y: 250, z: 100 }, volume, 5);
    expect(r.fits).toBe(true);
    expect(r.rotated).toBe(true);
    expect(r.axes.find((a) => a.axis === "x")!.needMm).toBe(250);
  });

  it("never turns Z: a part too tall fails on Z by the overrun", () => {
    const r = fitsBuildVolume({ x: 100, y: 100, z: 148 }, volume, 5);
    expect(r.fits).toBe(false);
    expect(r.failing).toHaveLength(1);
    expect(r.failing[0].axis).toBe("z");
    expect(r.failing[0].overMm).toBeCloseTo(3, 12);
  });

  it("reports the orientation that fails least, with amounts", () => {
    const r = fitsBuildVolume({ x: 320, y: 195, z: 100 }, volume, 5);
    expect(r.fits).toBe(false);
    // Straight: X over by 30, Y by 5. Turned: X 195 fits, Y 320 over by 130. Straight is closer.
    expect(r.rotated).toBe(false);
    expect(r.failing.map((a) => [a.axis, Number(a.overMm.toFixed(6))])).toEqual([
      ["x", 30],
      ["y", 5],
    ]);
  });

  it("the margin is kept on both sides in X/Y and above in Z", () => {
    expect(fitsBuildVolume({ x: 290, y: 190, z: 145 }, volume, 5).fits).toBe(true);
    expect(fitsBuildVolume({ x: 290.01, y: 190, z: 145 }, volume, 5).fits).toBe(false);
    expect(fitsBuildVolume({ x: 290, y: 190, z: 145.01 }, volume, 5).fits).toBe(false);
    expect(() => fitsBuildVolume({ x: 1, y: 1, z: 1 }, volume, -1)).toThrow(ComputationError);
  });
});
