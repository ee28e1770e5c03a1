import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { MaterialInput } from "@/lib/setup/schemas";
import { throwStaleOrMissing } from "./versioned";

export async function listMaterials(db: Database) {
  return db
    .selectFrom("materials")
    .leftJoin("sinter_profiles", "sinter_profiles.id", "materials.default_profile_id")
    .selectAll("materials")
    .select(["sinter_profiles.code as default_profile_code"])
    .orderBy("materials.code")
    .execute();
}

export async function insertMaterial(db: Database, input: MaterialInput) {
  return db.insertInto("materials").values(input).returningAll().executeTakeFirstOrThrow();
}

export async function updateMaterial(db: Database, id: string, version: number, input: Partial<MaterialInput>) {
  const row = await db
    .updateTable("materials")
    .set({ ...input, version: sql`version + 1`, updated_at: sql`now()` })
    .where("id", "=", id)
    .where("version", "=", version)
    .returningAll()
    .executeTakeFirst();
  return row ?? throwStaleOrMissing(db, "materials", id, "Material");
}

export async function listProfileChoices(db: Database) {
  return db.selectFrom("sinter_profiles").select(["id", "code", "name", "revision", "retired"]).orderBy("code").orderBy("revision", "desc").execute();
}
