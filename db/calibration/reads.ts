import { type Transaction } from "kysely";
import { isUuid } from "@/lib/ids";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { MIN_SAMPLES_TO_APPLY, summarizeCalibration, type CalibrationRow } from "@/lib/finishing/calibration";
import type { CalibrationMaterialRow, MaterialCalibrationView } from "@/lib/finishing/types";

// Shrinkage calibration per material: the inspections that measured a unit green and sintered,
// their statistics, the history of applied changes, and applying a suggestion.

type Trx = Transaction<DB>;

export async function calibrationRows(db: Database | Trx, materialId: string): Promise<CalibrationRow[]> {
  const rows = await db
    .selectFrom("inspections as i")
    .innerJoin("units as u", "u.id", "i.unit_id")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .select([
      "i.id", "i.unit_id", "u.serial", "i.created_at", "i.green_source",
      "i.green_x_mm", "i.green_y_mm", "i.green_z_mm", "i.sintered_x_mm", "i.sintered_y_mm", "i.sintered_z_mm",
    ])
    .where("p.material_id", "=", materialId)
    .where("i.excluded_from_calibration", "=", false)
    .where((eb) =>
      eb.or([
        eb.and([eb("i.green_x_mm", "is not", null), eb("i.sintered_x_mm", "is not", null)]),
        eb.and([eb("i.green_y_mm", "is not", null), eb("i.sintered_y_mm", "is not", null)]),
        eb.and([eb("i.green_z_mm", "is not", null), eb("i.sintered_z_mm", "is not", null)]),
      ]),
    )
    .orderBy("i.created_at")
    .execute();
  return rows.map((r) => ({ ...r, created_at: new Date(r.created_at) }));
}

export async function listCalibrationMaterials(db: Database): Promise<CalibrationMaterialRow[]> {
  const rows = await db
    .selectFrom("materials as m")
    .select((eb) => [
      "m.id", "m.code", "m.name", "m.shrink_xy", "m.shrink_z", "m.version", "m.active",
      eb
        .selectFrom("inspections as i")
        .innerJoin("units as u", "u.id", "i.unit_id")
        .innerJoin("parts as p", "p.id", "u.part_id")
        .select((e) => e.fn.countAll<number>().as("n"))
        .whereRef("p.material_id", "=", "m.id")
        .where("i.excluded_from_calibration", "=", false)
        .where((e) => e.or([e("i.sintered_x_mm", "is not", null), e("i.sintered_y_mm", "is not", null), e("i.sintered_z_mm", "is not", null)]))
        .as("inspections"),
    ])
    .orderBy("m.code")
    .execute();
  return rows.map((r) => ({ ...r, shrink_xy: Number(r.shrink_xy), shrink_z: Number(r.shrink_z), inspections: Number(r.inspections ?? 0) }));
}

export async function loadMaterialCalibration(db: Database, materialId: string): Promise<MaterialCalibrationView> {
  if (!isUuid(materialId)) throw new AppError("not_found", "Material not found.");
  const material = await db
    .selectFrom("materials")
    .select(["id", "code", "name", "shrink_xy", "shrink_z", "version", "updated_at"])
    .where("id", "=", materialId)
    .executeTakeFirst();
  if (!material) throw new AppError("not_found", "Material not found.");
  const current = { shrink_xy: Number(material.shrink_xy), shrink_z: Number(material.shrink_z) };
  const [rows, history, excluded] = await Promise.all([
    calibrationRows(db, materialId),
    db
      .selectFrom("events as e")
      .leftJoin("users as us", "us.id", "e.actor_id")
      .select(["e.id", "e.kind", "e.created_at", "e.data", "e.reason", "us.name as actor_name"])
      .where("e.entity", "=", "material")
      .where("e.entity_id", "=", materialId)
      .where("e.kind", "in", ["calibration_applied", "shrinkage_change"])
      .orderBy("e.created_at", "desc")
      .limit(50)
      .execute(),
    db
      .selectFrom("inspections as i")
      .innerJoin("units as u", "u.id", "i.unit_id")
      .innerJoin("parts as p", "p.id", "u.part_id")
      .select(["i.id", "u.serial", "i.unit_id", "i.created_at", "i.exclusion_reason"])
      .where("p.material_id", "=", materialId)
      .where("i.excluded_from_calibration", "=", true)
      .orderBy("i.created_at", "desc")
      .execute(),
  ]);
  const summary = summarizeCalibration(rows, current);
  return {
    material: { ...material, ...current, updated_at: new Date(material.updated_at).toISOString() },
    min_samples: MIN_SAMPLES_TO_APPLY,
    ...summary,
    history: history.map((h) => ({ ...h, created_at: new Date(h.created_at).toISOString() })),
    excluded: excluded.map((x) => ({ ...x, created_at: new Date(x.created_at).toISOString() })),
  };
}

/** The calibration export: each material's inspections as the calibration page reads them (one material, or all). */
export async function listCalibrationForExport(db: Database, materialId?: string) {
  let q = db.selectFrom("materials").select(["id", "code", "name", "shrink_xy", "shrink_z"]).orderBy("code");
  if (materialId) q = q.where("id", "=", materialId);
  const materials = await q.execute();
  return Promise.all(
    materials.map(async (m) => ({ material: { ...m, shrink_xy: Number(m.shrink_xy), shrink_z: Number(m.shrink_z) }, rows: await calibrationRows(db, m.id) })),
  );
}
