import { inToMm, uinToUm, mmToIn, umToUin, type UnitSystem } from "@/lib/units";
import { checkRunoutAgainstStock, type RunoutCheck } from "@/lib/process/stock";
import { itToleranceUm, IT_TABLE_MAX_MM } from "@/lib/process/tolerance";
import { AXES, type Axis, type CreateInspection } from "./schemas";

// What an inspection means for the part: readings converted to stored units, the stock that
// was really left, whether a measured runout will still clean up, and the tolerance per axis.

/** Clean-up margin per side on top of the eccentricity: common practice (no published source). */
export const RUNOUT_MARGIN_MM = 0.05;

export type PartForFinishing = {
  nominal_x_mm: number;
  nominal_y_mm: number;
  nominal_z_mm: number;
  stock_x_neg_mm: number;
  stock_x_pos_mm: number;
  stock_y_neg_mm: number;
  stock_y_pos_mm: number;
  stock_z_neg_mm: number;
  stock_z_pos_mm: number;
  tolerance_um: number | null;
  tolerance_grade: string | null;
  target_ra_um: number | null;
};

export type AxisValues = Partial<Record<Axis, number>>;

export type StoredReadings = {
  green: AxisValues;
  sintered: AxisValues;
  finished: AxisValues;
  ra_um?: number;
  runout_mm?: number;
};

const lengthToMm = (v: number, units: UnitSystem) => (units === "in" ? inToMm(v) : v);
export const lengthFromMm = (mm: number, units: UnitSystem) => (units === "in" ? mmToIn(mm) : mm);
export const raToUm = (v: number, units: UnitSystem) => (units === "in" ? uinToUm(v) : v);
export const raFromUm = (um: number, units: UnitSystem) => (units === "in" ? umToUin(um) : um);

function axesToMm(values: AxisValues, units: UnitSystem): AxisValues {
  const out: AxisValues = {};
  for (const axis of AXES) if (values[axis] !== undefined) out[axis] = lengthToMm(values[axis]!, units);
  return out;
}

/** Readings as stored: mm and µm. */
export function toStoredReadings(input: CreateInspection): StoredReadings {
  return {
    green: axesToMm(input.green, input.units),
    sintered: axesToMm(input.sintered, input.units),
    finished: axesToMm(input.finished, input.units),
    ra_um: input.ra === undefined ? undefined : raToUm(input.ra, input.units),
    runout_mm: input.runout === undefined ? undefined : lengthToMm(input.runout, input.units),
  };
}

export const nominalOf = (part: PartForFinishing, axis: Axis) => part[`nominal_${axis}_mm`];

export function plannedStock(part: PartForFinishing, axis: Axis): { neg: number; pos: number } {
  return { neg: part[`stock_${axis}_neg_mm`], pos: part[`stock_${axis}_pos_mm`] };
}

export type StockLeft = {
  axis: Axis;
  /** Stock per side on a diameter across this axis, mm (negative: the part is under size). */
  perSideMm: number;
  source: "measured" | "planned";
};

/**
 * Stock per side actually left on a diameter across an axis. A measured as-sintered size
 * tells it exactly, (sintered − nominal)/2; without one, the thinner of the planned faces.
 */
export function stockLeft(part: PartForFinishing, axis: Axis, sinteredMm?: number): StockLeft {
  if (sinteredMm !== undefined) return { axis, perSideMm: (sinteredMm - nominalOf(part, axis)) / 2, source: "measured" };
  const s = plannedStock(part, axis);
  return { axis, perSideMm: Math.min(s.neg, s.pos), source: "planned" };
}

export type StockCheck = RunoutCheck & { axis: Axis; stockSource: "measured" | "planned"; underSize: boolean };

/** Warns when a runout reading leaves too little stock for the diameter to clean up. */
export function runoutStockCheck(
  part: PartForFinishing,
  axis: Axis,
  runoutMm: number,
  sinteredMm?: number,
  marginMm = RUNOUT_MARGIN_MM,
): StockCheck {
  const left = stockLeft(part, axis, sinteredMm);
  const underSize = left.perSideMm < 0;
  const check = checkRunoutAgainstStock(runoutMm, Math.max(0, left.perSideMm), marginMm);
  const message = underSize
    ? `as sintered the ${axis.toUpperCase()} size is ${(-left.perSideMm * 2).toFixed(3)} mm under nominal: no stock is left to clean up`
    : `${axis.toUpperCase()}: ${check.message}`;
  return { ...check, status: underSize ? "warning" : check.status, message, axis, stockSource: left.source, underSize };
}

export type ToleranceSummary =
  | { kind: "none" }
  | { kind: "plus_minus"; um: number }
  | { kind: "grade"; grade: string; perAxisUm: Partial<Record<Axis, number>>; beyondTable: Axis[] };

/** A ± value, or an ISO 286-1 grade read as µm for each nominal size of the part. */
export function toleranceSummary(part: PartForFinishing): ToleranceSummary {
  if (part.tolerance_um) return { kind: "plus_minus", um: part.tolerance_um };
  if (!part.tolerance_grade) return { kind: "none" };
  const perAxisUm: Partial<Record<Axis, number>> = {};
  const beyondTable: Axis[] = [];
  for (const axis of AXES) {
    const size = nominalOf(part, axis);
    if (size > IT_TABLE_MAX_MM) beyondTable.push(axis);
    else perAxisUm[axis] = itToleranceUm(size, part.tolerance_grade);
  }
  return { kind: "grade", grade: part.tolerance_grade, perAxisUm, beyondTable };
}

export type SizeDeviation = { axis: Axis; nominalMm: number; measuredMm: number; deviationUm: number; withinPlusMinus?: boolean };

/** Finished size against nominal; the ± verdict only where the drawing gives a ± value. */
export function sizeDeviations(part: PartForFinishing, finished: AxisValues): SizeDeviation[] {
  const tol = toleranceSummary(part);
  const out: SizeDeviation[] = [];
  for (const axis of AXES) {
    const measured = finished[axis];
    if (measured === undefined) continue;
    const nominalMm = nominalOf(part, axis);
    const deviationUm = (measured - nominalMm) * 1000;
    out.push({
      axis,
      nominalMm,
      measuredMm: measured,
      deviationUm,
      withinPlusMinus: tol.kind === "plus_minus" ? Math.abs(deviationUm) <= tol.um + 1e-9 : undefined,
    });
  }
  return out;
}

/** Realized shrinkage per axis where both green and sintered sizes are known. */
export function realizedPerAxis(green: AxisValues, sintered: AxisValues): AxisValues {
  const out: AxisValues = {};
  for (const axis of AXES) {
    const g = green[axis];
    const s = sintered[axis];
    if (g !== undefined && s !== undefined && g > 0) out[axis] = 1 - s / g;
  }
  return out;
}

/**
 * The size a unit was printed to: from the shrinkage its build was printed with when the
 * build kept a snapshot of it ({shrink_xy, shrink_z} or factors {xy, z}), else the part's
 * current green size. A recalibration after printing must not change what "as printed" means.
 */
export function plannedGreen(
  part: PartForFinishing & { green_x_mm: number | null; green_y_mm: number | null; green_z_mm: number | null },
  snapshot: unknown,
): AxisValues {
  const snap = (snapshot && typeof snapshot === "object" ? snapshot : {}) as Record<string, unknown>;
  const factors = (snap.factors && typeof snap.factors === "object" ? snap.factors : snap) as Record<string, unknown>;
  const isShrink = (v: unknown): v is number => typeof v === "number" && v > 0 && v < 0.5;
  const isFactor = (v: unknown): v is number => typeof v === "number" && v > 1 && v < 2;
  let fxy: number | undefined;
  let fz: number | undefined;
  if (isShrink(snap.shrink_xy) && isShrink(snap.shrink_z)) {
    fxy = 1 / (1 - snap.shrink_xy);
    fz = 1 / (1 - snap.shrink_z);
  } else if (isFactor(factors.xy) && isFactor(factors.z)) {
    fxy = factors.xy;
    fz = factors.z;
  }
  if (fxy !== undefined && fz !== undefined) {
    const f = { x: fxy, y: fxy, z: fz };
    const out: AxisValues = {};
    for (const axis of AXES) {
      const s = plannedStock(part, axis);
      out[axis] = (nominalOf(part, axis) + s.neg + s.pos) * f[axis];
    }
    return out;
  }
  const out: AxisValues = {};
  for (const axis of AXES) {
    const g = part[`green_${axis}_mm`];
    if (g !== null) out[axis] = g;
  }
  return out;
}
