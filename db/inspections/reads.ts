import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { InspectionExportFilter } from "@/lib/finishing/schemas";
import { isUuid } from "@/lib/ids";
import { type StockCheck } from "@/lib/finishing/inspection";
import type { InspectionView } from "@/lib/finishing/types";

export const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

export async function listInspectionsForUnit(db: Database, unitId: string): Promise<InspectionView[]> {
  const rows = await db
    .selectFrom("inspections as i")
    .leftJoin("users as us", "us.id", "i.inspector_id")
    .selectAll("i")
    .select("us.name as inspector_name")
    .where("i.unit_id", "=", unitId)
    .orderBy("i.created_at", "desc")
    .execute();
  const files = rows.length
    ? await db
        .selectFrom("inspection_files as inf")
        .innerJoin("files as f", "f.id", "inf.file_id")
        .select(["inf.inspection_id", "f.id", "f.filename", "f.content_type", "f.size_bytes", "f.created_at"])
        .where("inf.inspection_id", "in", rows.map((r) => r.id))
        .orderBy("f.created_at")
        .execute()
    : [];
  return rows.map((r) => ({
    id: r.id,
    created_at: new Date(r.created_at).toISOString(),
    inspector_name: r.inspector_name,
    passed: r.passed,
    reason: r.reason,
    notes: r.notes,
    green: { x: num(r.green_x_mm), y: num(r.green_y_mm), z: num(r.green_z_mm) },
    green_source: r.green_source,
    sintered: { x: num(r.sintered_x_mm), y: num(r.sintered_y_mm), z: num(r.sintered_z_mm) },
    finished: { x: num(r.finished_x_mm), y: num(r.finished_y_mm), z: num(r.finished_z_mm) },
    ra_um: num(r.ra_um),
    runout_mm: num(r.runout_mm),
    runout_axis: r.runout_axis,
    stock_check: r.stock_check as StockCheck | null,
    entered_units: r.entered_units,
    excluded_from_calibration: r.excluded_from_calibration,
    exclusion_reason: r.exclusion_reason,
    files: files
      .filter((f) => f.inspection_id === r.id)
      .map((f) => ({ id: f.id, filename: f.filename, content_type: f.content_type, size_bytes: Number(f.size_bytes), url: `/api/inspections/${r.id}/files/${f.id}` })),
  }));
}

export async function findInspection(db: Database, id: string) {
  if (!isUuid(id)) return undefined;
  return db.selectFrom("inspections").select(["id", "unit_id", "excluded_from_calibration"]).where("id", "=", id).executeTakeFirst();
}

export async function findInspectionFile(db: Database, inspectionId: string, fileId: string) {
  if (!isUuid(inspectionId) || !isUuid(fileId)) return undefined;
  return db
    .selectFrom("inspection_files as inf")
    .innerJoin("files as f", "f.id", "inf.file_id")
    .select(["f.id", "f.bucket", "f.object_key", "f.filename", "f.content_type", "f.size_bytes"])
    .where("inf.inspection_id", "=", inspectionId)
    .where("inf.file_id", "=", fileId)
    .executeTakeFirst();
}

/** Inspections for the CSV export, newest first: one unit's, one material's, or all, up to `limit`. */
export async function listInspectionsForExport(db: Database, f: InspectionExportFilter, limit: number) {
  let q = db
    .selectFrom("inspections as i")
    .innerJoin("units as u", "u.id", "i.unit_id")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .innerJoin("materials as m", "m.id", "p.material_id")
    .leftJoin("users as us", "us.id", "i.inspector_id")
    .select((eb) => [
      "i.id", "i.unit_id", "i.created_at", "u.serial", "o.code as order_code", "p.part_number", "m.code as material_code", "i.passed", "i.reason", "us.name as inspector_name",
      "i.entered_units", "i.green_x_mm", "i.green_y_mm", "i.green_z_mm", "i.green_source", "i.sintered_x_mm", "i.sintered_y_mm", "i.sintered_z_mm",
      "i.finished_x_mm", "i.finished_y_mm", "i.finished_z_mm", "i.ra_um", "i.runout_mm", "i.runout_axis", "i.excluded_from_calibration", "i.exclusion_reason", "i.notes",
      eb.selectFrom("inspection_files as inf").whereRef("inf.inspection_id", "=", "i.id").select((x) => x.fn.countAll<number>().as("n")).as("attachments"),
      sql<number>`count(*) over ()`.as("total"),
    ])
    .orderBy("i.created_at", "desc")
    .orderBy("i.id")
    .limit(limit);
  if (f.unit_id) q = q.where("i.unit_id", "=", f.unit_id);
  if (f.material_id) q = q.where("p.material_id", "=", f.material_id);
  const rows = await q.execute();
  return {
    total: rows.length ? Number(rows[0].total) : 0,
    rows: rows.map(({ total: _t, ...r }) => ({
      ...r,
      green_x_mm: num(r.green_x_mm), green_y_mm: num(r.green_y_mm), green_z_mm: num(r.green_z_mm),
      sintered_x_mm: num(r.sintered_x_mm), sintered_y_mm: num(r.sintered_y_mm), sintered_z_mm: num(r.sintered_z_mm),
      finished_x_mm: num(r.finished_x_mm), finished_y_mm: num(r.finished_y_mm), finished_z_mm: num(r.finished_z_mm),
      ra_um: num(r.ra_um), runout_mm: num(r.runout_mm), attachments: Number(r.attachments ?? 0),
    })),
  };
}
