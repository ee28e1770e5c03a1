import { z } from "zod";
import { ComputationError } from "@/lib/errors";

// Unit conversions and display formatting. Stored values are mm, µm (Ra), °C, g and minutes;
// conversions happen only at the edges (forms, labels, exports).

export const unitSystemSchema = z.enum(["mm", "in"]);
export type UnitSystem = z.infer<typeof unitSystemSchema>;

/** NIST SP 811 (2008) App. B.8: 1 in = 2.54 E−02 m exactly (International Yard and Pound, 1959). */
export const MM_PER_IN = 25.4;
/** 1 µin = 0.0254 µm exactly, from the exact inch. */
export const UM_PER_UIN = 0.0254;
/** International Yard and Pound Agreement (1959): 1 lb = 0.45359237 kg exactly. */
export const KG_PER_LB = 0.45359237;
export const G_PER_LB = 453.59237;

// The exact factors are written as integer ratios so that an integer input meets a single,
// correctly rounded division (125 µin → 3.175 µm, not 3.1750000000000003).
export const inToMm = (inches: number) => (inches * 254) / 10;
export const mmToIn = (mm: number) => (mm * 10) / 254;
export const uinToUm = (uin: number) => (uin * 254) / 10_000;
export const umToUin = (um: number) => (um * 10_000) / 254;
export const lbToG = (lb: number) => (lb * 45_359_237) / 100_000;
export const gToLb = (g: number) => (g * 100_000) / 45_359_237;
export const lbToKg = (lb: number) => (lb * 45_359_237) / 100_000_000;
export const kgToLb = (kg: number) => (kg * 100_000_000) / 45_359_237;
export const gToKg = (g: number) => g / 1000;
export const kgToG = (kg: number) => kg * 1000;
export const cToF = (c: number) => (c * 9) / 5 + 32;
export const fToC = (f: number) => ((f - 32) * 5) / 9;
/** A temperature difference or a rate (°C/min → °F/min): no offset. */
export const deltaCToF = (dc: number) => (dc * 9) / 5;
export const deltaFToC = (df: number) => (df * 5) / 9;
export const minutesToHours = (minutes: number) => minutes / 60;
export const hoursToMinutes = (hours: number) => hours * 60;

// Display rounding --------------------------------------------------------------------------

/** Number of decimals written in a typed value ("25.50" → 2), the input's stated resolution. */
export function decimalsOf(text: string): number {
  const match = /^\s*[-+]?\d*(?:\.(\d*))?(?:[eE]([-+]?\d+))?\s*$/.exec(text);
  if (!match) throw new ComputationError(`"${text}" is not a number`, "value");
  const fraction = match[1]?.length ?? 0;
  const exponent = match[2] ? Number(match[2]) : 0;
  return Math.max(0, fraction - exponent);
}

/**
 * Decimals to show after converting a value known to `sourceDecimals` decimals by `factor`
 * (target units per source unit). The source resolution 10^−d, converted, is rounded to the
 * nearest power of ten, so the result carries no more digits than the input justifies
 * (NIST LC 1137 style: 36 in → 91 cm, not 91.44 cm).
 */
export function decimalsAfterConversion(sourceDecimals: number, factor: number): number {
  if (!Number.isInteger(sourceDecimals) || sourceDecimals < 0) {
    throw new ComputationError("sourceDecimals must be a whole number ≥ 0", "sourceDecimals");
  }
  if (!(factor > 0) || !Number.isFinite(factor)) {
    throw new ComputationError("factor must be a positive finite number", "factor");
  }
  return Math.max(0, sourceDecimals - Math.round(Math.log10(factor)));
}

/** Fixed-decimal text without a "-0" artefact. */
export function toFixedClean(value: number, decimals: number): string {
  if (!Number.isFinite(value)) throw new ComputationError(`cannot display ${String(value)}`, "value");
  const text = value.toFixed(decimals);
  return /^-0(?:\.0*)?$/.test(text) ? text.slice(1) : text;
}

/** Significant-figure text with trailing zeros removed ("0.800" → "0.8"). */
export function toSignificantClean(value: number, significant: number): string {
  if (!Number.isFinite(value)) throw new ComputationError(`cannot display ${String(value)}`, "value");
  const text = String(Number(value.toPrecision(significant)));
  return text === "-0" ? "0" : text;
}

/** Stored lengths are taken to be resolved to 0.01 mm; that becomes 0.001 in. */
export const DEFAULT_MM_DECIMALS = 2;

export function formatLength(mm: number, system: UnitSystem, digits?: number): string {
  if (system === "mm") return `${toFixedClean(mm, digits ?? DEFAULT_MM_DECIMALS)} mm`;
  const decimals = digits ?? decimalsAfterConversion(DEFAULT_MM_DECIMALS, 1 / MM_PER_IN);
  return `${toFixedClean(mmToIn(mm), decimals)} in`;
}

/** Ra is measured to about three significant figures at best; the exact conversion is shown. */
export function formatRa(um: number, system: UnitSystem, significant = 3): string {
  if (system === "mm") return `${toSignificantClean(um, significant)} µm`;
  return `${toSignificantClean(umToUin(um), significant)} µin`;
}

/** Masses are recorded to 0.1 g; kilograms from 1 kg up, pounds for the inch system. */
export function formatMass(g: number, system: UnitSystem, digits?: number): string {
  if (system === "mm") {
    if (Math.abs(g) >= 1000) return `${toFixedClean(gToKg(g), digits ?? 4)} kg`;
    return `${toFixedClean(g, digits ?? 1)} g`;
  }
  const decimals = digits ?? decimalsAfterConversion(1, 1 / G_PER_LB);
  return `${toFixedClean(gToLb(g), decimals)} lb`;
}

export function formatTemperature(c: number, system: UnitSystem, digits = 0): string {
  return system === "mm" ? `${toFixedClean(c, digits)} °C` : `${toFixedClean(cToF(c), digits)} °F`;
}

/** "9 h 31 min"; days from 24 h on ("1 d 2 h 5 min"); rounded to the whole minute. */
export function formatDuration(minutes: number): string {
  if (!Number.isFinite(minutes) || minutes < 0) {
    throw new ComputationError(`a duration must be a finite number of minutes ≥ 0 (got ${minutes})`, "minutes");
  }
  const total = Math.round(minutes);
  const days = Math.floor(total / 1440);
  const hours = Math.floor((total % 1440) / 60);
  const mins = total % 60;
  const parts: string[] = [];
  if (days) parts.push(`${days} d`);
  if (hours) parts.push(`${hours} h`);
  if (mins || parts.length === 0) parts.push(`${mins} min`);
  return parts.join(" ");
}

// Nominal Ra ladder -------------------------------------------------------------------------

/**
 * Preferred Ra values and the customary µin label of each rung. The labels are rounded
 * preferred numbers, not conversions: 3.2 µm is labelled 125 µin but is 125.98 µin exactly.
 * Rungs as charted in ASME B46.1-style roughness tables (seen in secondary chart copies).
 */
export const RA_LADDER: ReadonlyArray<{ um: number; nominalUin: number }> = [
  { um: 0.025, nominalUin: 1 },
  { um: 0.05, nominalUin: 2 },
  { um: 0.1, nominalUin: 4 },
  { um: 0.2, nominalUin: 8 },
  { um: 0.4, nominalUin: 16 },
  { um: 0.8, nominalUin: 32 },
  { um: 1.6, nominalUin: 63 },
  { um: 3.2, nominalUin: 125 },
  { um: 6.3, nominalUin: 250 },
  { um: 12.5, nominalUin: 500 },
  { um: 25, nominalUin: 1000 },
  { um: 50, nominalUin: 2000 },
];

export type RaRung = { um: number; nominalUin: number; exactUin: number };

const RUNG_TOLERANCE = 1e-9;

/** The ladder rung at exactly this Ra in µm, or undefined when it is not a preferred value. */
export function raRungForUm(um: number): RaRung | undefined {
  const rung = RA_LADDER.find((r) => Math.abs(r.um - um) <= RUNG_TOLERANCE * Math.max(1, um));
  return rung && { ...rung, exactUin: umToUin(rung.um) };
}

/** The rung whose nominal µin label this is (125 → 3.2 µm), or undefined. */
export function raRungForNominalUin(uin: number): RaRung | undefined {
  const rung = RA_LADDER.find((r) => r.nominalUin === uin);
  return rung && { ...rung, exactUin: umToUin(rung.um) };
}

/** The label a drawing would carry: the nominal pair for a rung, else the exact conversion. */
export function raDrawingLabel(um: number, system: UnitSystem): string {
  const rung = raRungForUm(um);
  if (!rung) return formatRa(um, system);
  return system === "mm" ? `Ra ${toSignificantClean(rung.um, 3)} µm` : `Ra ${rung.nominalUin} µin`;
}
