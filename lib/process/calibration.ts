import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";
import { studentTQuantile } from "@/lib/process/student-t";

// Shrinkage calibration from inspections. Each measured green/sintered pair gives a realized
// linear shrinkage s = 1 − sintered/green; per material and axis the running mean, sample
// standard deviation and count are kept with Welford's online update (Welford 1962,
// Technometrics 4(3):419–420), which stays accurate where Σx² − n·mean² would cancel.

export type RunningStats = Readonly<{ count: number; mean: number; m2: number }>;

export const EMPTY_STATS: RunningStats = { count: 0, mean: 0, m2: 0 };

export function welfordAdd(stats: RunningStats, x: number): RunningStats {
  if (!Number.isFinite(x)) throw new ComputationError(`a sample must be a finite number (got ${x})`, "x");
  const count = stats.count + 1;
  const delta = x - stats.mean;
  const mean = stats.mean + delta / count;
  return { count, mean, m2: stats.m2 + delta * (x - mean) };
}

export function welfordFrom(samples: Iterable<number>): RunningStats {
  let stats = EMPTY_STATS;
  for (const x of samples) stats = welfordAdd(stats, x);
  return stats;
}

/**
 * Combines two summaries as if their samples had been pooled (Chan, Golub & LeVeque,
 * "Updating formulae and a pairwise algorithm for computing sample variances", 1979; from memory).
 */
export function welfordMerge(a: RunningStats, b: RunningStats): RunningStats {
  if (a.count === 0) return b;
  if (b.count === 0) return a;
  const count = a.count + b.count;
  const delta = b.mean - a.mean;
  return {
    count,
    mean: a.mean + (delta * b.count) / count,
    m2: a.m2 + b.m2 + (delta * delta * a.count * b.count) / count,
  };
}

/** Sample variance (n − 1 in the denominator); undefined below two samples. */
export function sampleVariance(stats: RunningStats): number | undefined {
  return stats.count < 2 ? undefined : Math.max(0, stats.m2) / (stats.count - 1);
}

export function sampleStdDev(stats: RunningStats): number | undefined {
  const v = sampleVariance(stats);
  return v === undefined ? undefined : Math.sqrt(v);
}

/** Realized linear shrinkage from a measured green and sintered length. */
export function realizedShrinkage(greenMm: number, sinteredMm: number): number {
  if (!(greenMm > 0) || !Number.isFinite(greenMm)) {
    throw new ComputationError(`the green length must be greater than 0 mm (got ${greenMm})`, "greenMm");
  }
  if (!(sinteredMm > 0) || !Number.isFinite(sinteredMm)) {
    throw new ComputationError(`the sintered length must be greater than 0 mm (got ${sinteredMm})`, "sinteredMm");
  }
  const s = 1 - sinteredMm / greenMm;
  if (!(s > 0 && s < 0.5)) {
    throw new ComputationError(
      `green ${greenMm} mm → sintered ${sinteredMm} mm is a shrinkage of ${(s * 100).toFixed(2)} %, ` +
        "outside (0, 50 %): the two readings are probably swapped or from different features",
      "sinteredMm",
    );
  }
  return s;
}

export type AxisCalibration = {
  count: number;
  meanShrinkage: number;
  /** Sample standard deviation of the shrinkage; undefined below two samples. */
  stdDev?: number;
  /** Scale-up factor from the mean: f = 1/(1 − mean). */
  suggestedFactor: number;
  /** Two-sided t interval on the mean shrinkage and the factors it maps to. */
  interval?: { level: number; shrinkage: [number, number]; factor: [number, number]; halfWidth: number };
  stats: RunningStats;
};

/** Mean, spread, factor and a t-based confidence interval for one axis's running summary. */
export function summarizeAxis(stats: RunningStats, level = 0.95): AxisCalibration {
  if (stats.count < 1) throw new ComputationError("no measurements on this axis yet", "stats");
  if (!(level > 0 && level < 1)) throw new ComputationError(`the confidence level must lie in (0, 1) (got ${level})`, "level");
  const mean = stats.mean;
  if (!(mean > 0 && mean < 0.5)) {
    throw new ComputationError(`a mean shrinkage of ${mean} lies outside (0, 0.5)`, "stats");
  }
  const stdDev = sampleStdDev(stats);
  const result: AxisCalibration = {
    count: stats.count,
    meanShrinkage: mean,
    stdDev,
    suggestedFactor: 1 / (1 - mean),
    stats,
  };
  if (stdDev !== undefined) {
    const t = studentTQuantile(1 - (1 - level) / 2, stats.count - 1);
    const halfWidth = (t * stdDev) / Math.sqrt(stats.count);
    const lo = Math.max(mean - halfWidth, Number.MIN_VALUE);
    const hi = Math.min(mean + halfWidth, 0.5 - Number.EPSILON);
    // f = 1/(1 − s) rises with s, so the interval's ends map to the factor's ends.
    result.interval = { level, shrinkage: [lo, hi], factor: [1 / (1 - lo), 1 / (1 - hi)], halfWidth };
  }
  return result;
}

const lengthPairSchema = z.object({ green: z.number().positive(), sintered: z.number().positive() });

export const inspectionSampleSchema = z.object({
  x: lengthPairSchema.optional(),
  y: lengthPairSchema.optional(),
  z: lengthPairSchema.optional(),
});
export type InspectionSample = z.infer<typeof inspectionSampleSchema>;

export type MaterialCalibration = {
  x?: AxisCalibration;
  y?: AxisCalibration;
  /** X and Y pooled: the material stores one in-plane shrinkage. */
  xy?: AxisCalibration;
  z?: AxisCalibration;
};

/** Per-axis calibration of one material from its inspections (axes without data are left out). */
export function calibrateMaterial(samples: InspectionSample[], level = 0.95): MaterialCalibration {
  const list = parseInput(z.array(inspectionSampleSchema), samples, "calibration");
  let x = EMPTY_STATS;
  let y = EMPTY_STATS;
  let zs = EMPTY_STATS;
  for (const s of list) {
    if (s.x) x = welfordAdd(x, realizedShrinkage(s.x.green, s.x.sintered));
    if (s.y) y = welfordAdd(y, realizedShrinkage(s.y.green, s.y.sintered));
    if (s.z) zs = welfordAdd(zs, realizedShrinkage(s.z.green, s.z.sintered));
  }
  const xy = welfordMerge(x, y);
  const summary = (stats: RunningStats) => (stats.count > 0 ? summarizeAxis(stats, level) : undefined);
  return { x: summary(x), y: summary(y), xy: summary(xy), z: summary(zs) };
}

export type ShrinkageSuggestion = {
  axis: "xy" | "z";
  current: number;
  suggested: number;
  change: number;
  count: number;
  /** The current value lies outside the confidence interval of the measured mean. */
  currentOutsideInterval: boolean;
  /** Enough samples to act on (`minCount`). */
  enoughData: boolean;
};

/** What a material's XY and Z shrinkage would become if set to the measured means. */
export function suggestShrinkageUpdate(
  current: { shrinkXY: number; shrinkZ: number },
  calibration: MaterialCalibration,
  minCount = 5,
): ShrinkageSuggestion[] {
  const out: ShrinkageSuggestion[] = [];
  const one = (axis: "xy" | "z", now: number, cal?: AxisCalibration) => {
    if (!cal) return;
    const interval = cal.interval?.shrinkage;
    out.push({
      axis,
      current: now,
      suggested: cal.meanShrinkage,
      change: cal.meanShrinkage - now,
      count: cal.count,
      currentOutsideInterval: interval ? now < interval[0] || now > interval[1] : false,
      enoughData: cal.count >= minCount,
    });
  };
  one("xy", current.shrinkXY, calibration.xy);
  one("z", current.shrinkZ, calibration.z);
  return out;
}
