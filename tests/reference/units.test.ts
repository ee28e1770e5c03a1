import { describe, expect, it } from "vitest";
import {
  decimalsAfterConversion,
  formatRa,
  G_PER_LB,
  inToMm,
  KG_PER_LB,
  lbToG,
  lbToKg,
  MM_PER_IN,
  mmToIn,
  RA_LADDER,
  raDrawingLabel,
  raRungForNominalUin,
  raRungForUm,
  toFixedClean,
  uinToUm,
  umToUin,
} from "@/lib/units";

describe("NIST SP 811 (2008) App. B.8 and the 1959 International Yard and Pound Agreement", () => {
  it("1 in = 2.54 E−02 m exactly", () => {
    expect(MM_PER_IN).toBe(25.4);
    expect(inToMm(1)).toBe(25.4);
    expect(inToMm(100)).toBe(2540);
    expect(mmToIn(25.4)).toBe(1);
    expect(mmToIn(inToMm(0.001))).toBeCloseTo(0.001, 15);
  });

  it("1 mil = 2.54 E−05 m exactly", () => {
    expect(inToMm(0.001)).toBe(0.0254);
  });

  it("1 lb = 0.45359237 kg exactly", () => {
    expect(KG_PER_LB).toBe(0.45359237);
    expect(G_PER_LB).toBe(453.59237);
    expect(lbToKg(1)).toBe(0.45359237);
    expect(lbToG(1)).toBe(453.59237);
    expect(lbToG(100)).toBe(45359.237);
  });

  it("NIST LC 1137 rounding: 36 in → 91 cm, not 91.44", () => {
    const cm = inToMm(36) / 10;
    expect(cm).toBeCloseTo(91.44, 12);
    const decimals = decimalsAfterConversion(0, 2.54);
    expect(toFixedClean(cm, decimals)).toBe("91");
  });
});

describe("Ra: exact conversion vs the nominal ladder (REFERENCES §7)", () => {
  // Exact µin from 1 µin = 0.0254 µm (a-i-t.com chart; follows from the exact inch).
  const exact: Array<[number, number, number]> = [
    [0.1, 3.937, 4],
    [0.2, 7.874, 8],
    [0.4, 15.748, 16],
    [0.8, 31.496, 32],
    [1.6, 62.992, 63],
    [3.2, 125.984, 125],
    [6.3, 248.031, 250],
    [12.5, 492.126, 500],
  ];
  it.each(exact)("%f µm is %f µin exactly, labelled %i µin", (um, exactUin, nominal) => {
    expect(umToUin(um)).toBeCloseTo(exactUin, 3);
    const rung = raRungForUm(um)!;
    expect(rung.nominalUin).toBe(nominal);
    expect(rung.exactUin).toBeCloseTo(exactUin, 3);
    // The label and the conversion are different numbers except by coincidence.
    expect(raDrawingLabel(um, "in")).toBe(`Ra ${nominal} µin`);
  });

  it("125 µin = 3.175 µm exactly, not 3.2", () => {
    expect(uinToUm(125)).toBe(3.175);
    expect(raRungForNominalUin(125)!.um).toBe(3.2);
    expect(formatRa(3.2, "in")).toBe("126 µin");
  });

  it("the ladder pairs 0.025↔1 … 50↔2000 (dfwmachine.com, a-i-t.com charts)", () => {
    expect(RA_LADDER[0]).toEqual({ um: 0.025, nominalUin: 1 });
    expect(RA_LADDER[RA_LADDER.length - 1]).toEqual({ um: 50, nominalUin: 2000 });
    for (const r of RA_LADDER) {
      // Each label is within 4 % of its exact conversion: a rounded preferred number.
      expect(Math.abs(umToUin(r.um) - r.nominalUin) / r.nominalUin).toBeLessThan(0.04);
    }
  });
});
