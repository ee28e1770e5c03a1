import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import {
  cToF,
  decimalsAfterConversion,
  decimalsOf,
  deltaCToF,
  fToC,
  formatDuration,
  formatLength,
  formatMass,
  formatRa,
  formatTemperature,
  gToLb,
  kgToLb,
  lbToG,
  raDrawingLabel,
  raRungForUm,
} from "@/lib/units";

describe("length display", () => {
  it("mm to 0.01 mm, inches to 0.001 in by default", () => {
    expect(formatLength(25.4, "mm")).toBe("25.40 mm");
    expect(formatLength(25.4, "in")).toBe("1.000 in");
    expect(formatLength(30.357142857, "mm")).toBe("30.36 mm");
    expect(formatLength(30.357142857, "in")).toBe("1.195 in");
    expect(formatLength(12.7, "in", 4)).toBe("0.5000 in");
  });

  it("no negative zero", () => {
    expect(formatLength(-0.001, "mm")).toBe("0.00 mm");
  });

  it("conversion decimals follow the input's resolution", () => {
    expect(decimalsAfterConversion(2, 1 / 25.4)).toBe(3); // 0.01 mm → 0.001 in
    expect(decimalsAfterConversion(3, 25.4)).toBe(2); // 0.001 in → 0.01 mm
    expect(decimalsAfterConversion(4, 25.4)).toBe(3); // 0.0001 in → 0.001 mm
    expect(decimalsAfterConversion(0, 25.4)).toBe(0);
    expect(() => decimalsAfterConversion(-1, 2)).toThrow(ComputationError);
    expect(() => decimalsAfterConversion(1, 0)).toThrow(ComputationError);
  });

  it("decimalsOf reads a typed value's resolution", () => {
    expect(decimalsOf("25.50")).toBe(2);
    expect(decimalsOf("36")).toBe(0);
    expect(decimalsOf("1.5e-2")).toBe(3);
    expect(decimalsOf(" -0.125 ")).toBe(3);
    expect(() => decimalsOf("12 mm")).toThrow(ComputationError);
  });
});

// Ra is the arithmetical mean deviation of the roughness profile from its mean line,
// (1/l)∫|z| dx: ISO 4287:1997 (superseded by ISO 21920-2:2021) and ASME B46.1-2002. It is a
// length, so µm and µin convert as lengths (1 µin = 0.0254 µm, NIST SP 811 B.8).
describe("Ra display", () => {
  it("three significant figures, trailing zeros dropped", () => {
    expect(formatRa(0.8, "mm")).toBe("0.8 µm");
    expect(formatRa(12.5, "mm")).toBe("12.5 µm");
    expect(formatRa(0.8, "in")).toBe("31.5 µin"); // 0.8 / 0.0254 = 31.496 µin
    expect(formatRa(1.6, "in")).toBe("63 µin");
  });

  it("the drawing label uses the ladder only on a rung", () => {
    expect(raDrawingLabel(0.8, "in")).toBe("Ra 32 µin");
    expect(raDrawingLabel(0.8, "mm")).toBe("Ra 0.8 µm");
    expect(raDrawingLabel(0.9, "in")).toBe("35.4 µin");
    expect(raRungForUm(0.9)).toBeUndefined();
  });
});

describe("mass, temperature and duration display", () => {
  it("g below 1 kg, kg above, lb for the inch system", () => {
    expect(formatMass(48.48, "mm")).toBe("48.5 g");
    expect(formatMass(2500, "mm")).toBe("2.5000 kg");
    expect(formatMass(453.59237, "in")).toBe("1.0000 lb");
    expect(gToLb(lbToG(3.2))).toBeCloseTo(3.2, 12);
    expect(kgToLb(0.45359237)).toBe(1);
  });

  it("°C and °F", () => {
    expect(cToF(100)).toBe(212);
    expect(fToC(32)).toBe(0);
    expect(cToF(-40)).toBe(-40);
    expect(deltaCToF(5)).toBe(9);
    expect(formatTemperature(1350, "mm")).toBe("1350 °C");
    expect(formatTemperature(1350, "in")).toBe("2462 °F");
  });

  it("durations", () => {
    expect(formatDuration(571)).toBe("9 h 31 min");
    expect(formatDuration(0)).toBe("0 min");
    expect(formatDuration(45)).toBe("45 min");
    expect(formatDuration(120)).toBe("2 h");
    expect(formatDuration(59.6)).toBe("1 h");
    expect(formatDuration(1440 + 125)).toBe("1 d 2 h 5 min");
    expect(formatDuration(2880)).toBe("2 d");
    expect(() => formatDuration(-1)).toThrow(ComputationError);
    expect(() => formatDuration(NaN)).toThrow(ComputationError);
  });
});
