import type { CsvValue } from "@/lib/csv/safe-cell";
import type { ProjectionSummary } from "@/lib/parts/projection";
import { calibrationPoints, type CalibrationRow } from "@/lib/finishing/calibration";
import { AXES } from "@/lib/finishing/schemas";

// The columns of the orders, parts and units CSV exports: the tables' own rows as the lists show
// them (the same filters and sort), one line per row. lib/csv/safe-cell.ts neutralises text cells.

type Row = Record<string, CsvValue>;
const iso = (v: string | Date | null | undefined) => (v ? new Date(v).toISOString() : null);
const projection = (p: ProjectionSummary | null | undefined) => ({ projected_status: p?.status ?? null, projected_end: p?.projected_end ?? null, slack_minutes: p?.slack_minutes ?? null });

export const ORDER_CSV_FIELDS = ["code", "customer", "project", "due_at", "priority", "parts", "units", "units_done", "projected_status", "projected_end", "slack_minutes", "notes", "id"] as const;
export function orderCsvRow(r: {
  id: string; code: string; customer: string; project: string; due_at: string; priority: number; notes: string;
  part_count: number; unit_count: number; done_count: number; projection: ProjectionSummary | null;
}): Row {
  return {
    code: r.code, customer: r.customer, project: r.project, due_at: iso(r.due_at), priority: r.priority, parts: r.part_count, units: r.unit_count, units_done: r.done_count,
    ...projection(r.projection), notes: r.notes, id: r.id,
  };
}

export const PART_CSV_FIELDS = [
  "order_code", "part_number", "revision", "name", "material", "quantity", "units", "due_at", "priority",
  "nominal_x_mm", "nominal_y_mm", "nominal_z_mm", "green_x_mm", "green_y_mm", "green_z_mm", "thickest_wall_mm", "volume_mm3",
  "target_ra_um", "tolerance_um", "tolerance_grade", "geometry_status", "geometry_file", "id",
] as const;
export function partCsvRow(r: {
  id: string; order_code: string; part_number: string; revision: string; name: string; material_code: string; quantity: number; unit_count: number; due_at: string; priority: number;
  nominal_x_mm: number; nominal_y_mm: number; nominal_z_mm: number; green_x_mm: number | null; green_y_mm: number | null; green_z_mm: number | null;
  thickest_wall_mm: number; volume_mm3: number | null; target_ra_um: number | null; tolerance_um: number | null; tolerance_grade: string | null;
  geometry_status: string | null; geometry_filename: string | null;
}): Row {
  return {
    order_code: r.order_code, part_number: r.part_number, revision: r.revision, name: r.name, material: r.material_code, quantity: r.quantity, units: r.unit_count,
    due_at: iso(r.due_at), priority: r.priority, nominal_x_mm: r.nominal_x_mm, nominal_y_mm: r.nominal_y_mm, nominal_z_mm: r.nominal_z_mm,
    green_x_mm: r.green_x_mm, green_y_mm: r.green_y_mm, green_z_mm: r.green_z_mm, thickest_wall_mm: r.thickest_wall_mm, volume_mm3: r.volume_mm3,
    target_ra_um: r.target_ra_um, tolerance_um: r.tolerance_um, tolerance_grade: r.tolerance_grade, geometry_status: r.geometry_status, geometry_file: r.geometry_filename, id: r.id,
  };
}

/** A unit with its trace through the shop: the build that printed it, the wash and the furnace run. */
export const UNIT_CSV_FIELDS = [
  "serial", "state", "order_code", "part_number", "revision", "part_name", "material", "due_at", "build", "build_state", "wash_batch", "furnace_run",
  "hold_reason", "scrap_reason", "state_changed_at", "projected_status", "projected_end", "slack_minutes", "id",
] as const;
export function unitCsvRow(r: {
  id: string; serial: string; state: string; order_code: string; part_number: string; revision: string; part_name: string; material_code: string; due_at: string;
  build_code: string | null; build_state: string | null; wash_code: string | null; run_code: string | null; hold_reason: string | null; scrap_reason: string | null;
  state_changed_at: string; projection: ProjectionSummary | null;
}): Row {
  return {
    serial: r.serial, state: r.state, order_code: r.order_code, part_number: r.part_number, revision: r.revision, part_name: r.part_name, material: r.material_code,
    due_at: iso(r.due_at), build: r.build_code, build_state: r.build_state, wash_batch: r.wash_code, furnace_run: r.run_code, hold_reason: r.hold_reason,
    scrap_reason: r.scrap_reason, state_changed_at: iso(r.state_changed_at), ...projection(r.projection), id: r.id,
  };
}

/** Every page of a paged list, in order, up to `max` rows: the export honours the list's filters and sort exactly. */
export async function allPages<T>(page: (n: number, size: number) => Promise<{ rows: T[]; total: number }>, size: number, max: number): Promise<{ rows: T[]; total: number }> {
  const rows: T[] = [];
  let total = 0;
  for (let n = 1; rows.length < max; n++) {
    const got = await page(n, size);
    total = got.total;
    rows.push(...got.rows);
    if (got.rows.length < size || rows.length >= total) break;
  }
  return { rows: rows.slice(0, max), total };
}

/** One line per inspection, with the unit, order, part and material it belongs to. */
export const INSPECTION_CSV_FIELDS = [
  "inspected_at", "serial", "order_code", "part_number", "material", "passed", "reason", "inspector", "entered_units",
  "green_x_mm", "green_y_mm", "green_z_mm", "green_source", "sintered_x_mm", "sintered_y_mm", "sintered_z_mm",
  "finished_x_mm", "finished_y_mm", "finished_z_mm", "ra_um", "runout_mm", "runout_axis",
  "excluded_from_calibration", "exclusion_reason", "notes", "attachments", "unit_id", "id",
] as const;
export function inspectionCsvRow(r: {
  id: string; unit_id: string; created_at: string | Date; serial: string; order_code: string; part_number: string; material_code: string; passed: boolean; reason: string | null;
  inspector_name: string | null; entered_units: string; green_x_mm: number | null; green_y_mm: number | null; green_z_mm: number | null; green_source: string;
  sintered_x_mm: number | null; sintered_y_mm: number | null; sintered_z_mm: number | null; finished_x_mm: number | null; finished_y_mm: number | null; finished_z_mm: number | null;
  ra_um: number | null; runout_mm: number | null; runout_axis: string | null; excluded_from_calibration: boolean; exclusion_reason: string | null; notes: string; attachments: number;
}): Row {
  return {
    inspected_at: iso(r.created_at), serial: r.serial, order_code: r.order_code, part_number: r.part_number, material: r.material_code, passed: r.passed, reason: r.reason,
    inspector: r.inspector_name, entered_units: r.entered_units, green_x_mm: r.green_x_mm, green_y_mm: r.green_y_mm, green_z_mm: r.green_z_mm, green_source: r.green_source,
    sintered_x_mm: r.sintered_x_mm, sintered_y_mm: r.sintered_y_mm, sintered_z_mm: r.sintered_z_mm, finished_x_mm: r.finished_x_mm, finished_y_mm: r.finished_y_mm, finished_z_mm: r.finished_z_mm,
    ra_um: r.ra_um, runout_mm: r.runout_mm, runout_axis: r.runout_axis, excluded_from_calibration: r.excluded_from_calibration, exclusion_reason: r.exclusion_reason, notes: r.notes,
    attachments: r.attachments, unit_id: r.unit_id, id: r.id,
  };
}

/**
 * The calibration page's data: one line per inspection and axis measured green and sintered, with
 * the realized shrinkage s = 1 − sintered / green as the page computes it (lib/finishing/calibration.ts:
 * calibrationPoints), or, for a reading the page sets aside, why (the reason names its shrinkage).
 */
export const CALIBRATION_CSV_FIELDS = [
  "material", "material_name", "inspected_at", "serial", "axis", "green_mm", "sintered_mm", "shrinkage", "green_source", "used", "set_aside_because",
  "material_shrink_xy", "material_shrink_z", "inspection_id", "unit_id",
] as const;
export function calibrationCsvRows(
  material: { code: string; name: string; shrink_xy: number; shrink_z: number },
  rows: CalibrationRow[],
): Row[] {
  const { points, rejected } = calibrationPoints(rows);
  const shrinkage = new Map(points.map((p) => [`${p.inspection_id}:${p.axis}`, p.shrinkage]));
  const why = new Map(rejected.map((r) => [`${r.inspection_id}:${r.axis}`, r.reason]));
  const out: Row[] = [];
  for (const r of [...rows].sort((a, b) => a.created_at.getTime() - b.created_at.getTime() || a.id.localeCompare(b.id))) {
    for (const axis of AXES) {
      const green = r[`green_${axis}_mm`];
      const sintered = r[`sintered_${axis}_mm`];
      if (green == null || sintered == null) continue;
      const key = `${r.id}:${axis}`;
      const reason = why.get(key) ?? null;
      out.push({
        material: material.code, material_name: material.name, inspected_at: r.created_at.toISOString(), serial: r.serial, axis, green_mm: green, sintered_mm: sintered,
        shrinkage: shrinkage.get(key) ?? null, green_source: r.green_source, used: shrinkage.has(key), set_aside_because: reason,
        material_shrink_xy: material.shrink_xy, material_shrink_z: material.shrink_z, inspection_id: r.id, unit_id: r.unit_id,
      });
    }
  }
  return out;
}
