import { describe, expect, it } from "vitest";
import { raFromUm, raToUm } from "@/lib/finishing/inspection";
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

// Ra, the arithmetical mean deviation of the assessed profile: Ra = (1/l)∫₀ˡ |z(x)| dx, the
// absolute heights z of the roughness profile measured from its mean line, averaged over the
// evaluation length l. Sources: ISO 4287:1997, Geometrical Product Specifications (GPS) —
// Surface texture: Profile method — Terms, definitions and surface texture parameters (identical
// to IS 15262:2002), superseded by ISO 21920-2:2021 (from memory); ASME B46.1-2002, Surface
// Texture (Surface Roughness, Waviness, and Lay), which calls it the roughness average.
// Ra is a mean of lengths, so it converts as a length: 1 µin = 0.0254 µm (NIST SP 811 B.8).
describe("Ra from its definition (ISO 4287 / ISO 21920-2, ASME B46.1)", () => {
  /** Ra by the definition, over a profile sampled at equal steps: mean |z − mean line|. */
  const raOf = (z: number[]) => {
    const mean = z.reduce((s, v) => s + v, 0) / z.length;
    return z.reduce((s, v) => s + Math.abs(v - mean), 0) / z.length;
  };
  // A sinusoid of amplitude A has Ra = 2A/π: the mean of |sin| over whole periods is 2/π
  // (computed here from the definition).
  const profile = (amplitude: number, offset: number, periods = 7, n = 70_000) =>
    Array.from({ length: n }, (_, i) => offset + amplitude * Math.sin((2 * Math.PI * periods * (i + 0.5)) / n));

  it("a sinusoid of amplitude A has Ra = 2A/π, whatever its height above the datum", () => {
    expect(raOf(profile(1.25, 0))).toBeCloseTo((2 * 1.25) / Math.PI, 6);
    expect(raOf(profile(1.25, 40))).toBeCloseTo((2 * 1.25) / Math.PI, 6);
  });

  it("an Ra entered in µin is stored as the Ra of the same profile measured in µm", () => {
    const uin = profile(50, 3);
    const raUin = raOf(uin);
    expect(raToUm(raUin, "in")).toBeCloseTo(raOf(uin.map((z) => z * 0.0254)), 9);
    expect(raToUm(raUin, "in")).toBeCloseTo(((2 * 50) / Math.PI) * 0.0254, 6);
    expect(raFromUm(raToUm(raUin, "in"), "in")).toBeCloseTo(raUin, 9);
    expect(raToUm(0.8, "mm")).toBe(0.8);
  });
});

describe("Ra: exact conversion vs the nominal ladder (REFERENCES §7)", () => {
  // Ra as defined in ISO 4287:1997 / ISO 21920-2:2021 and ASME B46.1-2002 (above); the ladder
  // is of preferred Ra values. Exact µin from 1 µin = 0.0254 µm (a-i-t.com chart; follows
  // from the exact inch).
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
