import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";

// Solvent (wash) debinding. Binder leaves by diffusion through the thickest wall, so at long
// times the time to a given fraction left grows with the square of the wall: t = k·h² + t_min
// (Crank, The Mathematics of Diffusion, 2nd ed., 1975, eq. 4.18, long-time limit). The H²
// law holds for thick sections; thin walls, where dissolution also limits, come out faster
// than a thick-wall calibration predicts, which the minimum t_min partly absorbs.

export const washUnitSchema = z.object({
  /** Thickest wall of the green part, mm. */
  thickestWallMm: z.number().positive(),
  /** Material's rate constant, min/mm². */
  kMinPerMm2: z.number().positive(),
  /** Floor on any wash, min (handling, solvent soak). */
  minMinutes: z.number().nonnegative().default(0),
});
export type WashUnit = z.input<typeof washUnitSchema>;

export function washMinutes(unit: WashUnit): number {
  const { thickestWallMm: h, kMinPerMm2: k, minMinutes } = parseInput(washUnitSchema, unit, "wash time");
  return k * h * h + minMinutes;
}

/** A batch stays in the solvent until its slowest unit is done. */
export function washBatchMinutes(units: WashUnit[]): { minutes: number; slowestIndex: number } {
  if (!Array.isArray(units) || units.length === 0) {
    throw new ComputationError("a wash batch needs at least one unit", "units");
  }
  let minutes = -Infinity;
  let slowestIndex = -1;
  units.forEach((unit, i) => {
    const t = washMinutes(unit);
    if (t > minutes) {
      minutes = t;
      slowestIndex = i;
    }
  });
  return { minutes, slowestIndex };
}

export type MassLossCheck = {
  /** (green − brown)/green. */
  lossFraction: number;
  passed: boolean;
  /** Fraction of the green mass still to come out to pass (0 when passed). */
  shortBy: number;
  /** The same in grams. */
  shortByG: number;
};

/** Did the wash take out enough binder? (m_green − m_brown)/m_green ≥ the material's minimum. */
export function massLossCheck(greenG: number, brownG: number, minFraction: number): MassLossCheck {
  if (!(greenG > 0) || !Number.isFinite(greenG)) {
    throw new ComputationError(`the green mass must be greater than 0 g (got ${greenG})`, "greenG");
  }
  if (!(brownG > 0) || !Number.isFinite(brownG)) {
    throw new ComputationError(`the brown mass must be greater than 0 g (got ${brownG})`, "brownG");
  }
  if (brownG > greenG) {
    throw new ComputationError(
      `the brown mass ${brownG} g exceeds the green mass ${greenG} g: a wash cannot add mass ` +
        "(check the weighings or whether they were swapped)",
      "brownG",
    );
  }
  if (!(minFraction > 0 && minFraction < 1)) {
    throw new ComputationError(`the minimum mass loss must lie in (0, 1) (got ${minFraction})`, "minFraction");
  }
  const lossFraction = (greenG - brownG) / greenG;
  // A weighing that lands exactly on the limit passes; 1e-12 absorbs the division's rounding.
  const passed = lossFraction >= minFraction - 1e-12;
  const shortBy = passed ? 0 : minFraction - lossFraction;
  return { lossFraction, passed, shortBy, shortByG: shortBy * greenG };
}

// Fickian diffusion out of a plane sheet --------------------------------------------------

const PI2 = Math.PI * Math.PI;

function checkDiffusion(dMm2PerS: number, halfThicknessMm: number) {
  if (!(dMm2PerS > 0) || !Number.isFinite(dMm2PerS)) {
    throw new ComputationError(`the diffusivity must be greater than 0 (got ${dMm2PerS})`, "diffusivity");
  }
  if (!(halfThicknessMm > 0) || !Number.isFinite(halfThicknessMm)) {
    throw new ComputationError(`the half-thickness must be greater than 0 (got ${halfThicknessMm})`, "halfThicknessMm");
  }
}

/**
 * Fraction of the soluble binder still in a sheet of thickness 2l wetted on both faces after
 * t seconds (Crank 1975, eq. 4.18, full series):
 * F(t) = Σ_{n≥0} 8/((2n+1)²π²) · exp(−(2n+1)²π² D t / (4 l²)).
 */
export function fickRemainingFraction(dMm2PerS: number, halfThicknessMm: number, seconds: number): number {
  checkDiffusion(dMm2PerS, halfThicknessMm);
  if (!(seconds >= 0) || !Number.isFinite(seconds)) {
    throw new ComputationError(`the time must be ≥ 0 s (got ${seconds})`, "seconds");
  }
  if (seconds === 0) return 1;
  const tau = (PI2 * dMm2PerS * seconds) / (4 * halfThicknessMm * halfThicknessMm);
  let sum = 0;
  // The exponential ends the sum quickly except at very short times; there the cap of 5·10⁶
  // terms leaves a tail below Σ_{m>10⁷} 8/(π²m²) < 1e-7.
  for (let n = 0; n < 5_000_000; n++) {
    const m = 2 * n + 1;
    const term = (8 / (m * m * PI2)) * Math.exp(-m * m * tau);
    sum += term;
    if (term < 1e-16 * sum) break;
  }
  return Math.min(1, sum);
}

/**
 * Long-time (one-term) inverse: the time for F to fall to `fraction`,
 * t = (4 l² / (π² D)) · ln(8 / (π² F)). Valid where the first term dominates, F < 8/π².
 */
export function fickSecondsToFraction(dMm2PerS: number, halfThicknessMm: number, fraction: number): number {
  checkDiffusion(dMm2PerS, halfThicknessMm);
  if (!(fraction > 0 && fraction < 8 / PI2)) {
    throw new ComputationError(
      `the one-term solution needs a remaining fraction in (0, 8/π² ≈ 0.811) (got ${fraction})`,
      "fraction",
    );
  }
  return ((4 * halfThicknessMm * halfThicknessMm) / (PI2 * dMm2PerS)) * Math.log(8 / (PI2 * fraction));
}

/** Effective diffusivity (mm²/s) from one calibration wash: wall H = 2l reached F after t s. */
export function fickDiffusivityFromCalibration(wallMm: number, seconds: number, fraction: number): number {
  if (!(wallMm > 0) || !Number.isFinite(wallMm)) {
    throw new ComputationError(`the wall must be greater than 0 mm (got ${wallMm})`, "wallMm");
  }
  if (!(seconds > 0) || !Number.isFinite(seconds)) {
    throw new ComputationError(`the time must be greater than 0 s (got ${seconds})`, "seconds");
  }
  if (!(fraction > 0 && fraction < 8 / PI2)) {
    throw new ComputationError(`the remaining fraction must lie in (0, 8/π²) (got ${fraction})`, "fraction");
  }
  const l = wallMm / 2;
  return ((4 * l * l) / (PI2 * seconds)) * Math.log(8 / (PI2 * fraction));
}

/**
 * The k of t = k·h² (min/mm², h = the full wall) that reaches `fraction` with diffusivity D:
 * from t = (h²/(π² D))·ln(8/(π² F)).
 */
export function washKFromDiffusivity(dMm2PerS: number, fraction: number): number {
  checkDiffusion(dMm2PerS, 1);
  if (!(fraction > 0 && fraction < 8 / PI2)) {
    throw new ComputationError(`the remaining fraction must lie in (0, 8/π²) (got ${fraction})`, "fraction");
  }
  return Math.log(8 / (PI2 * fraction)) / (PI2 * dMm2PerS) / 60;
}

/** k from a calibration wash: a wall of h mm needed t minutes (above the minimum). */
export function washKFromCalibration(wallMm: number, minutes: number, minMinutes = 0): number {
  if (!(wallMm > 0) || !Number.isFinite(wallMm)) {
    throw new ComputationError(`the wall must be greater than 0 mm (got ${wallMm})`, "wallMm");
  }
  if (!(minutes > minMinutes) || !Number.isFinite(minutes)) {
    throw new ComputationError("the calibration time must exceed the minimum wash time", "minutes");
  }
  return (minutes - minMinutes) / (wallMm * wallMm);
}
