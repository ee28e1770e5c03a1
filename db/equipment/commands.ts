import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { FurnaceInput, PrinterInput, WashStationInput } from "@/lib/setup/schemas";
import { throwStaleOrMissing } from "@/db/versioned";

async function setPrinterMaterials(db: Database, printerId: string, materialIds: string[]) {
  await db.deleteFrom("printer_materials").where("printer_id", "=", printerId).execute();
  if (materialIds.length) await db.insertInto("printer_materials").values(materialIds.map((material_id) => ({ printer_id: printerId, material_id }))).execute();
}

async function setFurnaceProfiles(db: Database, furnaceId: string, profileIds: string[]) {
  await db.deleteFrom("furnace_profiles").where("furnace_id", "=", furnaceId).execute();
  if (profileIds.length) await db.insertInto("furnace_profiles").values(profileIds.map((profile_id) => ({ furnace_id: furnaceId, profile_id }))).execute();
}

export async function insertPrinter(db: Database, input: PrinterInput) {
  const { material_ids, ...values } = input;
  return db.transaction().execute(async (trx) => {
    const row = await trx.insertInto("printers").values(values).returningAll().executeTakeFirstOrThrow();
    await setPrinterMaterials(trx, row.id, material_ids);
    return row;
  });
}

export async function updatePrinter(db: Database, id: string, version: number, input: Partial<PrinterInput>) {
  const { material_ids, ...values } = input;
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("printers")
      .set({ ...values, version: sql`version + 1` })
      .where("id", "=", id)
      .where("version", "=", version)
      .returningAll()
      .executeTakeFirst();
    if (!row) return throwStaleOrMissing(trx, "printers", id, "Printer");
    if (material_ids) await setPrinterMaterials(trx, id, material_ids);
    return row;
  });
}

export async function insertWashStation(db: Database, values: WashStationInput) {
  return db.insertInto("wash_stations").values(values).returningAll().executeTakeFirstOrThrow();
}

export async function updateWashStation(db: Database, id: string, version: number, values: Partial<WashStationInput>) {
  const row = await db
    .updateTable("wash_stations")
    .set({ ...values, version: sql`version + 1` })
    .where("id", "=", id)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
  return row ?? throwStaleOrMissing(db, "wash_stations", id, "Wash station");
}

export async function insertFurnace(db: Database, input: FurnaceInput) {
  const { profile_ids, ...values } = input;
  return db.transaction().execute(async (trx) => {
    const row = await trx.insertInto("furnaces").values(values).returningAll().executeTakeFirstOrThrow();
    await setFurnaceProfiles(trx, row.id, profile_ids);
    return row;
  });
}

export async function updateFurnace(db: Database, id: string, version: number, input: Partial<FurnaceInput>) {
  const { profile_ids, ...values } = input;
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("furnaces")
      .set({ ...values, version: sql`version + 1` })
      .where("id", "=", id)
      .where("version", "=", version)
      .returningAll()
      .executeTakeFirst();
    if (!row) return throwStaleOrMissing(trx, "furnaces", id, "Furnace");
    if (profile_ids) await setFurnaceProfiles(trx, id, profile_ids);
    return row;
  });
}

export async function insertMaintenanceWindow(db: Database, w: { resource: "printer" | "wash_station" | "furnace"; resource_id: string; starts_at: Date; ends_at: Date; reason: string }) {
  return db
    .insertInto("maintenance_windows")
    .values({
      resource: w.resource,
      printer_id: w.resource === "printer" ? w.resource_id : null,
      wash_station_id: w.resource === "wash_station" ? w.resource_id : null,
      furnace_id: w.resource === "furnace" ? w.resource_id : null,
      starts_at: w.starts_at,
      ends_at: w.ends_at,
      reason: w.reason,
    })
    .returningAll()
    .executeTakeFirstOrThrow();
}

export async function deleteMaintenanceWindow(db: Database, id: string) {
  return db.deleteFrom("maintenance_windows").where("id", "=", id).returning("id").executeTakeFirst();
}
