import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { basicBand, IT_GRADES, itSizeStep, itToleranceUm, normalizeItGrade } from "@/lib/process/tolerance";

describe("IT table lookup", () => {
  it("accepts grade numbers and names", () => {
    expect(itToleranceUm(25, 7)).toBe(21);
    expect(itToleranceUm(25, "IT7")).toBe(21);
    expect(itToleranceUm(25, " it7 ")).toBe(21);
    expect(itToleranceUm(25, "IT01")).toBe(0.6);
    expect(itToleranceUm(25, 0)).toBe(1);
    expect(normalizeItGrade(18)).toBe("IT18");
  });

  it("covers IT1–IT18 for every size step to 500 mm, rising with grade and size", () => {
    const sizes = [1.5, 4, 8, 14, 25, 40, 65, 100, 150, 200, 300, 350, 450, 500];
    let previousRow: number[] | undefined;
    for (const size of sizes) {
      const row = IT_GRADES.map((g) => itToleranceUm(size, g));
      for (let i = 1; i < row.length; i++) expect(row[i]).toBeGreaterThan(row[i - 1]);
      if (previousRow) for (let i = 0; i < row.length; i++) expect(row[i]).toBeGreaterThanOrEqual(previousRow[i]);
      previousRow = row;
    }
  });

  it("from IT6 up each grade is about 1.6× the one below (the R5 preferred series)", () => {
    for (const size of [25, 100, 450]) {
      for (let g = 7; g <= 18; g++) {
        const ratio = itToleranceUm(size, g) / itToleranceUm(size, g - 1);
        expect(ratio).toBeGreaterThan(1.4);
        expect(ratio).toBeLessThan(1.8);
      }
    }
  });

  it("size steps: over the lower bound, up to and including the upper", () => {
    expect(itSizeStep(3)).toEqual({ overMm: 0, upToMm: 3 });
    expect(itSizeStep(3.0001)).toEqual({ overMm: 3, upToMm: 6 });
    expect(itSizeStep(500)).toEqual({ overMm: 400, upToMm: 500 });
  });

  it("throws for sizes outside the table and for unknown grades", () => {
    for (const bad of [0, -5, 500.01, NaN, Infinity]) expect(() => itToleranceUm(bad, 7)).toThrow(ComputationError);
    for (const bad of [19, -1, 6.5, "IT19", "H7", ""]) {
      expect(() => itToleranceUm(25, bad as never)).toThrow(ComputationError);
    }
  });

  it("IT14–IT18 are not used up to 1 mm", () => {
    expect(() => itToleranceUm(0.8, 14)).toThrow(/not used/);
    expect(itToleranceUm(0.8, 13)).toBe(140);
    expect(itToleranceUm(1.2, 14)).toBe(250);
  });

  it("h and H bands", () => {
    const hole = basicBand(40, "H", "IT7");
    expect(hole.minMm).toBe(40);
    expect(hole.maxMm).toBeCloseTo(40.025, 12);
  });
});
