import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { buildPrintMinutes, printMinutes, solidFractionFromShell } from "@/lib/process/print-time";

const printer = { depositionCm3PerH: 20, layerHeightMm: 0.15, layerOverheadS: 8 };

describe("print time", () => {
  it("volume / rate + layers × overhead", () => {
    // 40 cm³ at 20 cm³/h = 120 min; 30 mm / 0.15 = 200 layers × 8 s = 26.67 min.
    const t = printMinutes({ greenVolumeMm3: 40_000, heightMm: 30 }, printer);
    expect(t.depositionMinutes).toBeCloseTo(120, 12);
    expect(t.layers).toBe(200);
    expect(t.overheadMinutes).toBeCloseTo(200 * 8 / 60, 12);
    expect(t.totalMinutes).toBeCloseTo(120 + 80 / 3, 12);
  });

  it("solid fraction and material rate factor", () => {
    const t = printMinutes({ greenVolumeMm3: 40_000, heightMm: 30 }, printer, { solidFraction: 0.5, rateFactor: 0.8 });
    expect(t.depositedCm3).toBeCloseTo(20, 12);
    expect(t.depositionMinutes).toBeCloseTo((20 / 16) * 60, 12);
  });

  it("a build: Σ volume / rate + layers of the tallest part", () => {
    const t = buildPrintMinutes({
      printer,
      parts: [
        { greenVolumeMm3: 10_000, heightMm: 12, quantity: 3 },
        { greenVolumeMm3: 20_000, heightMm: 45.05, solidFraction: 0.8 },
      ],
    });
    expect(t.depositedCm3).toBeCloseTo(30 + 16, 12);
    expect(t.layers).toBe(301); // 45.05 / 0.15 = 300.33 → 301
    expect(t.totalMinutes).toBeCloseTo((46 / 20) * 60 + (301 * 8) / 60, 12);
  });

  it("adding a part never shortens a build", () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ greenVolumeMm3: fc.double({ min: 1, max: 1e6, noNaN: true }), heightMm: fc.double({ min: 0.1, max: 300, noNaN: true }) }), {
          minLength: 1,
          maxLength: 6,
        }),
        fc.record({ greenVolumeMm3: fc.double({ min: 1, max: 1e6, noNaN: true }), heightMm: fc.double({ min: 0.1, max: 300, noNaN: true }) }),
        (parts, extra) => {
          const a = buildPrintMinutes({ printer, parts });
          const b = buildPrintMinutes({ printer, parts: [...parts, extra] });
          expect(b.totalMinutes).toBeGreaterThanOrEqual(a.totalMinutes);
          expect(Number.isFinite(b.totalMinutes)).toBe(true);
        },
      ),
    );
  });

  it("invalid input throws", () => {
    expect(() => buildPrintMinutes({ printer, parts: [] })).toThrow(ComputationError);
    expect(() => printMinutes({ greenVolumeMm3: -1, heightMm: 3 }, printer)).toThrow(ComputationError);
    expect(() => printMinutes({ greenVolumeMm3: 1, heightMm: 3 }, { ...printer, depositionCm3PerH: 0 })).toThrow(ComputationError);
  });
});

describe("solid fraction from shells and infill", () => {
  it("shell = area × thickness, the rest at the infill fraction", () => {
    // 20 mm cube: V 8000, A 2400; 1 mm shell = 2400 mm³; infill 20 % of 5600 = 1120.
    expect(solidFractionFromShell({ volumeMm3: 8000, surfaceAreaMm2: 2400, shellThicknessMm: 1, infillFraction: 0.2 })).toBeCloseTo(
      (2400 + 1120) / 8000,
      12,
    );
  });

  it("a shell thicker than the part is the whole part", () => {
    expect(solidFractionFromShell({ volumeMm3: 100, surfaceAreaMm2: 200, shellThicknessMm: 2, infillFraction: 0 })).toBe(1);
    expect(() => solidFractionFromShell({ volumeMm3: 100, surfaceAreaMm2: 200, shellThicknessMm: 0, infillFraction: 0 })).toThrow(
      ComputationError,
    );
  });
});
