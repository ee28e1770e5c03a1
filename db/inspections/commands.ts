import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import { INSPECTABLE, type UnitState } from "@/lib/finishing/transitions";
import { plannedGreen, runoutStockCheck, toStoredReadings, type PartForFinishing, type StockCheck } from "@/lib/finishing/inspection";
import { AXES, type CreateInspection } from "@/lib/finishing/schemas";
import { lockUnitAtVersion } from "@/db/finishing/commands";
import { num } from "./reads";
import { recordEvents } from "@/db/versioned";

// Inspection records: the readings in mm and µm, the runout-against-stock check as it was
// shown, attachments in object storage, and whether calibration may use the record.

type Trx = Transaction<DB>;

async function partForUnit(trx: Trx, partId: string, buildId: string | null) {
  const p = await trx
    .selectFrom("parts")
    .select([
      "nominal_x_mm", "nominal_y_mm", "nominal_z_mm", "green_x_mm", "green_y_mm", "green_z_mm",
      "stock_x_neg_mm", "stock_x_pos_mm", "stock_y_neg_mm", "stock_y_pos_mm", "stock_z_neg_mm", "stock_z_pos_mm",
      "tolerance_um", "tolerance_grade", "target_ra_um",
    ])
    .where("id", "=", partId)
    .executeTakeFirstOrThrow();
  const part: PartForFinishing = {
    nominal_x_mm: Number(p.nominal_x_mm), nominal_y_mm: Number(p.nominal_y_mm), nominal_z_mm: Number(p.nominal_z_mm),
    stock_x_neg_mm: Number(p.stock_x_neg_mm), stock_x_pos_mm: Number(p.stock_x_pos_mm),
    stock_y_neg_mm: Number(p.stock_y_neg_mm), stock_y_pos_mm: Number(p.stock_y_pos_mm),
    stock_z_neg_mm: Number(p.stock_z_neg_mm), stock_z_pos_mm: Number(p.stock_z_pos_mm),
    tolerance_um: num(p.tolerance_um), tolerance_grade: p.tolerance_grade, target_ra_um: num(p.target_ra_um),
  };
  const build = buildId ? await trx.selectFrom("builds").select("scale_snapshot").where("id", "=", buildId).executeTakeFirst() : undefined;
  const green = plannedGreen({ ...part, green_x_mm: num(p.green_x_mm), green_y_mm: num(p.green_y_mm), green_z_mm: num(p.green_z_mm) }, build?.scale_snapshot);
  return { part, green };
}

export type InsertedInspection = { id: string; unit_version: number; stock_check: StockCheck | null };

export async function insertInspection(db: Database, input: CreateInspection, inspectorId: string): Promise<InsertedInspection> {
  return db.transaction().execute(async (trx) => {
    const unit = await lockUnitAtVersion(trx, input.unit_id, input.version);
    if (!INSPECTABLE.includes(unit.state as UnitState)) {
      const msg = `Inspections are recorded while a unit is ready for finishing or in finishing; ${unit.serial} is ${unit.state.replaceAll("_", " ")}.`;
      throw new AppError("invalid", msg, { unit_id: [msg] });
    }
    const { part, green: planned } = await partForUnit(trx, unit.part_id, unit.build_id);
    const r = toStoredReadings(input);
    // "Planned" means the size the part was scaled up to: fill the axes the inspector left out.
    if (input.green_source === "planned") {
      for (const axis of AXES) if (r.green[axis] === undefined && planned[axis] !== undefined) r.green[axis] = planned[axis];
    }
    for (const axis of AXES) {
      const g = r.green[axis];
      const s = r.sintered[axis];
      if (g !== undefined && s !== undefined && !(s < g && s > g / 2)) {
        const msg = `as-sintered ${axis.toUpperCase()} ${s.toFixed(3)} mm against green ${g.toFixed(3)} mm is not a shrinkage between 0 and 50 %`;
        throw new AppError("invalid", msg, { [`sintered.${axis}`]: [msg] });
      }
    }
    const stockCheck =
      r.runout_mm !== undefined && input.runout_axis
        ? runoutStockCheck(part, input.runout_axis, r.runout_mm, r.sintered[input.runout_axis])
        : null;
    const row = await trx
      .insertInto("inspections")
      .values({
        unit_id: unit.id,
        inspector_id: inspectorId,
        green_x_mm: r.green.x ?? null, green_y_mm: r.green.y ?? null, green_z_mm: r.green.z ?? null,
        sintered_x_mm: r.sintered.x ?? null, sintered_y_mm: r.sintered.y ?? null, sintered_z_mm: r.sintered.z ?? null,
        finished_x_mm: r.finished.x ?? null, finished_y_mm: r.finished.y ?? null, finished_z_mm: r.finished.z ?? null,
        green_source: input.green_source,
        ra_um: r.ra_um ?? null,
        runout_mm: r.runout_mm ?? null,
        runout_axis: input.runout_axis ?? null,
        stock_check: stockCheck ? JSON.stringify(stockCheck) : null,
        entered_units: input.units,
        passed: input.passed,
        reason: input.reason || null,
        notes: input.notes,
      })
      .returning("id")
      .executeTakeFirstOrThrow();
    const bumped = await trx
      .updateTable("units")
      .set({ version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", unit.id)
      .returning("version")
      .executeTakeFirstOrThrow();
    await recordEvents(trx, [{
        entity: "unit",
        entity_id: unit.id,
        kind: "inspection",
        actor_id: inspectorId,
        reason: input.passed ? "inspection passed" : `inspection failed: ${input.reason}`,
        data: { inspection_id: row.id, passed: input.passed, stock_warning: stockCheck?.status === "warning" ? stockCheck.message : undefined },
      }]);
    return { id: row.id, unit_version: bumped.version, stock_check: stockCheck };
  });
}

/** The file row and the inspection link, after the object is already in storage. */
export async function insertInspectionFile(
  db: Database,
  inspectionId: string,
  file: { bucket: string; object_key: string; filename: string; content_type: string; size_bytes: number; sha256: string },
  uploadedBy: string,
) {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto("files")
      .values({ ...file, kind: "attachment", status: "done", uploaded_by: uploadedBy })
      .returning(["id", "filename", "content_type", "size_bytes"])
      .executeTakeFirstOrThrow();
    await trx.insertInto("inspection_files").values({ inspection_id: inspectionId, file_id: row.id }).execute();
    const unit = await trx.selectFrom("inspections").select("unit_id").where("id", "=", inspectionId).executeTakeFirstOrThrow();
    await recordEvents(trx, [{ entity: "unit", entity_id: unit.unit_id, kind: "attachment", actor_id: uploadedBy, reason: `attached ${file.filename}`, data: { inspection_id: inspectionId, file_id: row.id } }]);
    return { ...row, size_bytes: Number(row.size_bytes), url: `/api/inspections/${inspectionId}/files/${row.id}` };
  });
}

/** An admin leaves a bad measurement out of calibration (or takes it back in); logged. */
export async function setCalibrationExclusion(db: Database, id: string, excluded: boolean, reason: string | undefined, actorId: string) {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("inspections")
      .set({ excluded_from_calibration: excluded, exclusion_reason: excluded ? reason! : null, excluded_by: excluded ? actorId : null })
      .where("id", "=", id)
      .returning(["id", "unit_id", "excluded_from_calibration", "exclusion_reason"])
      .executeTakeFirst();
    if (!row) throw new AppError("not_found", "Inspection not found.");
    await recordEvents(trx, [{
        entity: "unit",
        entity_id: row.unit_id,
        kind: excluded ? "calibration_excluded" : "calibration_included",
        actor_id: actorId,
        reason: excluded ? reason : "measurement taken back into calibration",
        data: { inspection_id: id },
      }]);
    return row;
  });
}
