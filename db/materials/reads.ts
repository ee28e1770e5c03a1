import type { Database } from "@/db/client";

export async function listMaterials(db: Database) {
  return db
    .selectFrom("materials")
    .leftJoin("sinter_profiles", "sinter_profiles.id", "materials.default_profile_id")
    .selectAll("materials")
    .select(["sinter_profiles.code as default_profile_code"])
    .orderBy("materials.code")
    .execute();
}

export async function listProfileChoices(db: Database) {
  return db.selectFrom("sinter_profiles").select(["id", "code", "name", "revision", "retired"]).orderBy("code").orderBy("revision", "desc").execute();
}
