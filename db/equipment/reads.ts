import { sql } from "kysely";
import type { Database } from "@/db/client";
import { jsonArrayFrom } from "kysely/helpers/postgres";

export async function listPrinters(db: Database) {
  return db
    .selectFrom("printers")
    .selectAll("printers")
    .select((eb) => [
      jsonArrayFrom(
        eb.selectFrom("printer_materials").innerJoin("materials", "materials.id", "printer_materials.material_id").select(["materials.id", "materials.code"]).whereRef("printer_materials.printer_id", "=", "printers.id").orderBy("materials.code"),
      ).as("materials"),
    ])
    .orderBy("name")
    .execute();
}

export async function listWashStations(db: Database) {
  return db.selectFrom("wash_stations").selectAll().orderBy("name").execute();
}

export async function listFurnaces(db: Database) {
  return db
    .selectFrom("furnaces")
    .selectAll("furnaces")
    .select((eb) => [
      jsonArrayFrom(
        eb.selectFrom("furnace_profiles").innerJoin("sinter_profiles", "sinter_profiles.id", "furnace_profiles.profile_id").select(["sinter_profiles.id", "sinter_profiles.code", "sinter_profiles.revision"]).whereRef("furnace_profiles.furnace_id", "=", "furnaces.id").orderBy("sinter_profiles.code"),
      ).as("profiles"),
    ])
    .orderBy("name")
    .execute();
}

export async function listMaintenanceWindows(db: Database, from: Date, to: Date) {
  return db
    .selectFrom("maintenance_windows")
    .leftJoin("printers", "printers.id", "maintenance_windows.printer_id")
    .leftJoin("wash_stations", "wash_stations.id", "maintenance_windows.wash_station_id")
    .leftJoin("furnaces", "furnaces.id", "maintenance_windows.furnace_id")
    .select([
      "maintenance_windows.id", "maintenance_windows.resource", "maintenance_windows.printer_id", "maintenance_windows.wash_station_id",
      "maintenance_windows.furnace_id", "maintenance_windows.starts_at", "maintenance_windows.ends_at", "maintenance_windows.reason", "maintenance_windows.version",
    ])
    .select(sql<string>`coalesce(printers.name, wash_stations.name, furnaces.name)`.as("resource_name"))
    .where(sql<boolean>`tstzrange(maintenance_windows.starts_at, maintenance_windows.ends_at) && tstzrange(${from}, ${to})`)
    .orderBy("maintenance_windows.starts_at")
    .execute();
}
