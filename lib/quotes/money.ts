// Money is integer minor units of one currency (cents for EUR and USD). A figure is computed
// exactly in floating point from its inputs and rounded once, at the end, to whole minor units:
// halves round up (toward +∞), as commercial rounding of a positive price does. The tiny
// relative nudge stops binary representation error from turning a decimal half such as
// 100.5 (from 1.005 × 100 = 100.49999999999999) into a round-down.

import { ComputationError } from "@/lib/errors";

export function roundMinor(exact: number): number {
  if (!Number.isFinite(exact)) throw new ComputationError("a money figure came out not finite", "money");
  return Math.floor(exact + 0.5 + Math.abs(exact) * 1e-12);
}

/** Minor units → "1 234.56 EUR"-style text with the currency's digits; Intl does the grouping. */
export function formatMoney(minor: number, currency: string, minorDigits: number, locale = "en-GB"): string {
  const major = minor / 10 ** minorDigits;
  try {
    return new Intl.NumberFormat(locale, { style: "currency", currency, minimumFractionDigits: minorDigits, maximumFractionDigits: minorDigits }).format(major);
  } catch {
    return `${major.toFixed(minorDigits)} ${currency}`;
  }
}

/** Major-unit text typed by a person ("12.50") → minor units, exactly; null when it is not a plain amount. */
export function parseMajor(text: string, minorDigits: number): number | null {
  const m = /^\s*(\d{1,12})(?:[.,](\d+))?\s*$/.exec(text);
  if (!m) return null;
  const frac = m[2] ?? "";
  if (frac.length > minorDigits) return null;
  return Number(m[1]) * 10 ** minorDigits + Number(frac.padEnd(minorDigits, "0") || "0");
}
