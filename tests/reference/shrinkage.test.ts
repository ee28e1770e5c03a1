import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  feedstockDensity,
  greenFromSintered,
  scaleFactor,
  scaleUp,
  shrinkageFromDensities,
  shrinkageFromSolidsLoading,
  skeletonDensityFromFeedstock,
  theoreticalDensityFromFeedstock,
} from "@/lib/process/scale-up";
import { basicBand, itToleranceUm } from "@/lib/process/tolerance";

// German & Bose, Injection Molding of Metals and Ceramics (MPIF 1997) / ASM Handbook Vol. 7:
// Y = 1 − (φ/f_s)^(1/3), Z = 1/(1 − Y). The expected values are recomputed here from the
// relation with independent arithmetic (Math.pow rather than the module's Math.cbrt), and
// checked against the worked table's rounded figures.
describe("German's shrinkage relation (worked table)", () => {
  const table: Array<[phi: number, fs: number, yPercent: number, z: number]> = [
    [0.6, 0.97, 14.8, 1.17365],
    [0.62, 0.98, 14.15, 1.16487],
    [0.65, 0.99, 13.09, 1.15055],
    [0.6, 1.0, 15.66, 1.18563],
    [0.58, 0.98, 16.04, 1.19106],
    [0.55, 0.97, 17.23, 1.20819],
  ];
  it.each(table)("φ = %f, f_s = %f", (phi, fs, yPercent, z) => {
    const independent = 1 - Math.pow(phi / fs, 1 / 3);
    const y = shrinkageFromSolidsLoading(phi, fs);
    expect(y).toBeCloseTo(independent, 12);
    expect(y * 100).toBeCloseTo(yPercent, 1); // table rounds to 0.01 %
    expect(scaleFactor(y)).toBeCloseTo(z, 4);
  });

  it("the same relation through densities equals the solids-loading form", () => {
    const rhoT = 7.78; // 17-4 PH, REFERENCES §3 (mill bulletin, from memory)
    const s1 = shrinkageFromSolidsLoading(0.6, 0.97);
    const s2 = shrinkageFromDensities(0.6 * rhoT, 0.97 * rhoT);
    expect(s2).toBeCloseTo(s1, 12);
  });

  it("teaching example: ~60 vol% powder → about 15 % per direction (lynda.com lesson)", () => {
    expect(shrinkageFromSolidsLoading(0.6, 1) * 100).toBeCloseTo(15.66, 2);
  });
});

describe("feedstock-density pitfall (REFERENCES §1, 17-4 PH, φ 0.60, binder 0.95 g/cm³)", () => {
  const phi = 0.6;
  const rhoBinder = 0.95;
  const rhoFeed = 5.05;
  const rhoT = theoreticalDensityFromFeedstock(rhoFeed, phi, rhoBinder);
  const rhoSintered = 0.97 * rhoT;

  it("the feedstock density follows from the rule of mixtures", () => {
    expect(feedstockDensity(phi, rhoT, rhoBinder)).toBeCloseTo(rhoFeed, 12);
  });

  it("feeding the feedstock density gives the wrong 12.5 %", () => {
    // This is the mistake the check exists for: without context the function cannot tell.
    expect(shrinkageFromDensities(rhoFeed, rhoSintered) * 100).toBeCloseTo(12.5, 1);
  });

  it("the skeleton density gives the correct 14.8 %", () => {
    const skeleton = skeletonDensityFromFeedstock(rhoFeed, phi, rhoBinder);
    expect(skeleton).toBeCloseTo(phi * rhoT, 12);
    expect(shrinkageFromDensities(skeleton, rhoSintered) * 100).toBeCloseTo(14.8, 1);
  });

  it("with context, a feedstock density is refused with the corrected value", () => {
    const context = { solidsLoading: phi, theoreticalDensity: rhoT, binderDensity: rhoBinder };
    let error: unknown;
    try {
      shrinkageFromDensities(rhoFeed, rhoSintered, context);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(ComputationError);
    expect((error as ComputationError).message).toMatch(/feedstock/);
    expect((error as ComputationError).details?.expectedSkeleton).toBeCloseTo(phi * rhoT, 9);
    expect(shrinkageFromDensities(phi * rhoT, rhoSintered, context) * 100).toBeCloseTo(14.8, 1);
  });
});

describe("handbook and published scale-up examples", () => {
  it("13.8 mm shrinking to 12 mm is 0.13 (ASM Handbook Vol. 7 MIM article, as excerpted)", () => {
    const y = 1 - 12 / 13.8;
    expect(y).toBeCloseTo(0.1304, 4);
    expect(greenFromSintered(12, y)).toBeCloseTo(13.8, 10);
    // Working backwards, (12/13.8)³ = φ/f_s = 0.6575, and the relation returns the same Y.
    const ratio = Math.pow(12 / 13.8, 3);
    expect(ratio).toBeCloseTo(0.6575, 4);
    expect(shrinkageFromSolidsLoading(ratio, 1)).toBeCloseTo(y, 12);
  });

  it("16 % → 1.19 and 20 % → 1.25 (brm-metal.com MIM FAQ)", () => {
    expect(Number(scaleFactor(0.16).toFixed(2))).toBe(1.19);
    expect(scaleFactor(0.16)).toBeCloseTo(1.1905, 4);
    expect(scaleFactor(0.2)).toBeCloseTo(1.25, 12);
  });
});

describe("Ø25 h6 end to end (REFERENCES §6, ISO 286-1 table)", () => {
  it("IT6 at 25 mm is 13 µm and the h6 band is 25.000/24.987", () => {
    expect(itToleranceUm(25, "IT6")).toBe(13);
    const band = basicBand(25, "h", 6);
    expect(band.maxMm).toBe(25);
    expect(band.minMm).toBeCloseTo(24.987, 9);
  });

  it("0.25 mm per side, 16 % XY → green Ø30.357; along Z at 20 % → 31.875", () => {
    const r = scaleUp({
      nominal: { x: 25, y: 25, z: 25 },
      stock: { x_neg: 0.25, x_pos: 0.25, y_neg: 0.25, y_pos: 0.25, z_neg: 0.25, z_pos: 0.25 },
      shrink: { xy: 0.16, z: 0.2 },
    });
    expect(r.x.withStock).toBeCloseTo(25.5, 12);
    expect(r.x.green).toBeCloseTo(30.357, 3);
    expect(r.y.green).toBeCloseTo(30.357, 3);
    expect(r.z.green).toBeCloseTo(31.875, 12);
  });
});
