import {
  calibrateMaterial,
  suggestShrinkageUpdate,
  type InspectionSample,
  type MaterialCalibration,
  type ShrinkageSuggestion,
} from "@/lib/process/calibration";
import { AXES, type Axis } from "./schemas";

// A material's inspections as calibration data: one point per axis measured green and
// sintered, the per-axis statistics, and what the material's factors would become.

export type CalibrationRow = {
  id: string;
  unit_id: string;
  serial: string;
  created_at: Date;
  green_x_mm: number | null;
  green_y_mm: number | null;
  green_z_mm: number | null;
  sintered_x_mm: number | null;
  sintered_y_mm: number | null;
  sintered_z_mm: number | null;
  green_source: "measured" | "planned";
};

export type CalibrationPoint = {
  inspection_id: string;
  unit_id: string;
  serial: string;
  at: string;
  axis: Axis;
  shrinkage: number;
  green_source: "measured" | "planned";
};

export type RejectedReading = { inspection_id: string; serial: string; axis: Axis; reason: string };

/** Minimum inspections of a material axis before an admin may apply a suggestion. */
export const MIN_SAMPLES_TO_APPLY = 5;

export function calibrationPoints(rows: CalibrationRow[]): { points: CalibrationPoint[]; samples: InspectionSample[]; rejected: RejectedReading[] } {
  const points: CalibrationPoint[] = [];
  const samples: InspectionSample[] = [];
  const rejected: RejectedReading[] = [];
  for (const row of [...rows].sort((a, b) => a.created_at.getTime() - b.created_at.getTime())) {
    const sample: InspectionSample = {};
    for (const axis of AXES) {
      const green = row[`green_${axis}_mm`];
      const sintered = row[`sintered_${axis}_mm`];
      if (green == null || sintered == null) continue;
      const shrinkage = 1 - sintered / green;
      // One implausible pair (swapped readings, another feature) must not sink the whole chart.
      if (!(shrinkage > 0 && shrinkage < 0.5)) {
        rejected.push({ inspection_id: row.id, serial: row.serial, axis, reason: `shrinkage ${(shrinkage * 100).toFixed(2)} % is outside 0–50 %` });
        continue;
      }
      sample[axis] = { green, sintered };
      points.push({ inspection_id: row.id, unit_id: row.unit_id, serial: row.serial, at: row.created_at.toISOString(), axis, shrinkage, green_source: row.green_source });
    }
    if (sample.x || sample.y || sample.z) samples.push(sample);
  }
  return { points, samples, rejected };
}

export type CalibrationSummary = {
  points: CalibrationPoint[];
  rejected: RejectedReading[];
  calibration: MaterialCalibration;
  suggestions: ShrinkageSuggestion[];
  /** Inspections that measured each material axis (X or Y for xy). */
  inspections: { xy: number; z: number };
  /** Suggested shrinkage per material axis when enough inspections back it. */
  applicable: { xy?: number; z?: number };
};

export function summarizeCalibration(
  rows: CalibrationRow[],
  current: { shrink_xy: number; shrink_z: number },
  level = 0.95,
): CalibrationSummary {
  const { points, samples, rejected } = calibrationPoints(rows);
  const calibration = samples.length ? calibrateMaterial(samples, level) : {};
  // X and Y of one part pool into one in-plane estimate, but they are two readings of one part,
  // so "enough data" counts parts, not readings.
  const inspections = { xy: samples.filter((s) => s.x || s.y).length, z: samples.filter((s) => s.z).length };
  const suggestions = suggestShrinkageUpdate({ shrinkXY: current.shrink_xy, shrinkZ: current.shrink_z }, calibration, 1).map((s) => ({
    ...s,
    enoughData: inspections[s.axis] >= MIN_SAMPLES_TO_APPLY,
  }));
  const applicable: { xy?: number; z?: number } = {};
  for (const s of suggestions) if (s.enoughData) applicable[s.axis] = s.suggested;
  return { points, rejected, calibration, suggestions, inspections, applicable };
}

/** Scale-up factor f = 1/(1 − s). */
export const factorOf = (shrinkage: number) => 1 / (1 - shrinkage);

/** Suggested values compare equal when they agree to well below any measurement's resolution. */
export const sameSuggestion = (a: number | undefined, b: number | undefined) =>
  a !== undefined && b !== undefined && Math.abs(a - b) < 1e-9;
