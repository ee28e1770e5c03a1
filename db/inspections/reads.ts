import type { Database } from "@/db/client";
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
