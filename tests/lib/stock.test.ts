import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { checkRunoutAgainstStock, stockAdvice, stockForFace } from "@/lib/process/stock";

describe("stock advice per face", () => {
  it("scatter 0.3 % of the dimension + 0.1 mm clean-up, rounded up to 0.05 mm", () => {
    // 100 mm: 0.3 + 0.1 = 0.40.
    const a = stockForFace(100);
    expect(a.scatterMm).toBeCloseTo(0.3, 12);
    expect(a.stockMm).toBe(0.4);
    expect(a.governedBy).toBe("scatter");
    // 150 mm: 0.45 + 0.1 = 0.55.
    expect(stockForFace(150).stockMm).toBe(0.55);
    // 151 mm: 0.553 → 0.60.
    expect(stockForFace(151).stockMm).toBe(0.6);
  });

  it("small dimensions get the minimum", () => {
    const a = stockForFace(25);
    expect(a.stockMm).toBe(0.2);
    expect(a.governedBy).toBe("minimum");
  });

  it("defaults are configurable", () => {
    expect(stockForFace(100, { scatterFraction: 0.001, cleanupMm: 0.05, minimumMm: 0, stepMm: 0.01 }).stockMm).toBe(0.15);
    expect(() => stockForFace(100, { scatterFraction: -0.1 })).toThrow(ComputationError);
    expect(() => stockForFace(0)).toThrow(ComputationError);
  });

  it("only finished faces get stock", () => {
    const r = stockAdvice({ nominal: { x: 100, y: 25, z: 40 }, finishedFaces: { x_neg: true, x_pos: true, z_pos: true } });
    expect(r.stock).toEqual({ x_neg: 0.4, x_pos: 0.4, y_neg: 0, y_pos: 0, z_neg: 0, z_pos: 0.25 });
    expect(Object.keys(r.faces).sort()).toEqual(["x_neg", "x_pos", "z_pos"]);
  });
});

describe("runout against stock (common practice, no published source)", () => {
  it("0.25 mm per side covers 0.2 mm TIR with 0.1 mm margin", () => {
    const r = checkRunoutAgainstStock(0.2, 0.25, 0.1);
    expect(r.status).toBe("ok");
    expect(r.eccentricityMm).toBeCloseTo(0.1, 12);
    expect(r.requiredPerSideMm).toBeCloseTo(0.2, 12);
    expect(r.shortByMm).toBe(0);
  });

  it("warns with the shortfall", () => {
    const r = checkRunoutAgainstStock(0.5, 0.25, 0.1);
    expect(r.status).toBe("warning");
    expect(r.shortByMm).toBeCloseTo(0.1, 12);
    expect(r.message).toMatch(/0\.100 mm short/);
  });

  it("exactly at the limit is a warning: the stock must exceed it", () => {
    expect(checkRunoutAgainstStock(0.2, 0.2, 0.1).status).toBe("warning");
  });

  it("rejects negative or non-finite readings", () => {
    expect(() => checkRunoutAgainstStock(-0.1, 0.2, 0.1)).toThrow(ComputationError);
    expect(() => checkRunoutAgainstStock(0.1, NaN, 0.1)).toThrow(ComputationError);
  });
});
