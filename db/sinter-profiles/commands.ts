import { sql, type Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";
import type { ProfileInput } from "@/lib/batches/schemas";
import { listProfiles } from "@/db/batches/reads";
import { cycleMinutesFor } from "@/lib/batches/board-unit";
import { recordEvents } from "@/db/versioned";

type Trx = Transaction<DB>;

async function checkRefs(trx: Trx, input: ProfileInput) {
  if (input.material_ids.length) {
    const found = await trx.selectFrom("materials").select("id").where("id", "in", input.material_ids).execute();
    if (found.length !== new Set(input.material_ids).size) throw new AppError("invalid", "One of the materials does not exist.", { material_ids: ["unknown material"] });
  }
  if (input.furnace_ids.length) {
    const found = await trx.selectFrom("furnaces").select("id").where("id", "in", input.furnace_ids).execute();
    if (found.length !== new Set(input.furnace_ids).size) throw new AppError("invalid", "One of the furnaces does not exist.", { furnace_ids: ["unknown furnace"] });
  }
}

async function writeChildren(trx: Trx, profileId: string, input: ProfileInput) {
  await trx.deleteFrom("sinter_profile_segments").where("profile_id", "=", profileId).execute();
  await trx
    .insertInto("sinter_profile_segments")
    .values(input.segments.map((s, position) => ({ profile_id: profileId, position, rate_c_per_min: s.rate_c_per_min, setpoint_c: s.setpoint_c, hold_min: s.hold_min })))
    .execute();
  await trx.deleteFrom("sinter_profile_materials").where("profile_id", "=", profileId).execute();
  if (input.material_ids.length) {
    await trx.insertInto("sinter_profile_materials").values([...new Set(input.material_ids)].map((material_id) => ({ profile_id: profileId, material_id }))).execute();
  }
  await trx.deleteFrom("furnace_profiles").where("profile_id", "=", profileId).execute();
  if (input.furnace_ids.length) {
    await trx.insertInto("furnace_profiles").values([...new Set(input.furnace_ids)].map((furnace_id) => ({ profile_id: profileId, furnace_id }))).execute();
  }
}

export async function createProfile(trx: Trx, input: ProfileInput, actorId: string) {
  await checkRefs(trx, input);
  const clash = await trx.selectFrom("sinter_profiles").select("id").where(sql<boolean>`lower(code) = lower(${input.code})`).executeTakeFirst();
  if (clash) throw new AppError("invalid", `A profile with the code ${input.code} exists; edit it to make a new revision.`, { code: ["this code is taken"] });
  const row = await trx
    .insertInto("sinter_profiles")
    .values({
      code: input.code, name: input.name, atmosphere: input.atmosphere, start_temp_c: input.start_temp_c,
      cool_rate_c_per_min: input.cool_rate_c_per_min, cool_to_c: input.cool_to_c, notes: input.notes,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  await writeChildren(trx, row.id, input);
  await recordEvents(trx, [{ entity: "sinter_profile", entity_id: row.id, kind: "created", actor_id: actorId, data: { code: input.code, revision: 1 } }]);
  return row.id;
}

/**
 * Saves a profile. A revision that a scheduled, running or finished run already holds never
 * changes under it: the save becomes the next revision instead (supersedes_id), the old one
 * is retired, materials that defaulted to it and draft runs move to the new one.
 */
export async function updateProfile(trx: Trx, id: string, input: ProfileInput & { version: number }, actorId: string): Promise<{ id: string; revised: boolean }> {
  const row = await trx.selectFrom("sinter_profiles").selectAll().where("id", "=", id).forUpdate().executeTakeFirst();
  if (!row) throw new AppError("not_found", "That sinter profile does not exist.");
  if (row.version !== input.version) {
    throw new AppError("conflict", `Profile ${row.code} r${row.revision} was changed by someone else (you had version ${input.version}, it is now ${row.version}); reload it.`, undefined, { current_version: row.version });
  }
  const successor = await trx.selectFrom("sinter_profiles").select(["id", "revision"]).where("supersedes_id", "=", id).executeTakeFirst();
  if (successor) throw new AppError("conflict", `Revision ${row.revision} of ${row.code} has been replaced by revision ${successor.revision}; edit that one.`, undefined, { superseded_by: successor.id });
  await checkRefs(trx, input);
  const booked = await trx
    .selectFrom("furnace_runs")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where("profile_id", "=", id)
    .where("state", "in", ["scheduled", "running", "complete"])
    .executeTakeFirstOrThrow();
  if (Number(booked.n) === 0) {
    if (input.code.toLowerCase() !== row.code.toLowerCase()) {
      const clash = await trx.selectFrom("sinter_profiles").select("id").where(sql<boolean>`lower(code) = lower(${input.code})`).where("id", "<>", id).executeTakeFirst();
      if (clash) throw new AppError("invalid", `A profile with the code ${input.code} exists.`, { code: ["this code is taken"] });
    }
    await trx
      .updateTable("sinter_profiles")
      .set({
        code: input.code, name: input.name, atmosphere: input.atmosphere, start_temp_c: input.start_temp_c,
        cool_rate_c_per_min: input.cool_rate_c_per_min, cool_to_c: input.cool_to_c, notes: input.notes, version: row.version + 1,
      })
      .where("id", "=", id)
      .execute();
    await writeChildren(trx, id, input);
    // Draft runs carry no times, but their cycle estimate follows the profile.
    await refreshDraftCycles(trx, id);
    await recordEvents(trx, [{ entity: "sinter_profile", entity_id: id, kind: "updated", actor_id: actorId, data: { revision: row.revision } }]);
    return { id, revised: false };
  }
  if (input.code !== row.code) {
    throw new AppError("invalid", `Profile ${row.code} is held by ${booked.n} booked run(s); its code stays. Create a new profile for a new code.`, { code: ["the code of a profile in use stays"] });
  }
  const created = await trx
    .insertInto("sinter_profiles")
    .values({
      code: row.code, revision: row.revision + 1, supersedes_id: id, name: input.name, atmosphere: input.atmosphere, start_temp_c: input.start_temp_c,
      cool_rate_c_per_min: input.cool_rate_c_per_min, cool_to_c: input.cool_to_c, notes: input.notes,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  await writeChildren(trx, created.id, input);
  await trx.updateTable("sinter_profiles").set({ retired: true, version: row.version + 1 }).where("id", "=", id).execute();
  await trx.updateTable("materials").set({ default_profile_id: created.id, version: sql<number>`version + 1`, updated_at: new Date() }).where("default_profile_id", "=", id).execute();
  await trx.updateTable("furnace_runs").set({ profile_id: created.id, version: sql<number>`version + 1`, updated_at: new Date() }).where("profile_id", "=", id).where("state", "=", "draft").execute();
  await refreshDraftCycles(trx, created.id);
  await recordEvents(trx, [
    { entity: "sinter_profile", entity_id: created.id, kind: "revised", actor_id: actorId, reason: `${booked.n} booked run(s) keep revision ${row.revision}`, data: { supersedes_id: id, revision: row.revision + 1 } },
    { entity: "sinter_profile", entity_id: id, kind: "retired", actor_id: actorId, data: { superseded_by: created.id } },
  ]);
  return { id: created.id, revised: true };
}

async function refreshDraftCycles(trx: Trx, profileId: string) {
  const [profile] = await listProfiles(trx, { includeRetired: true, ids: [profileId] });
  const drafts = await trx
    .selectFrom("furnace_runs as r")
    .innerJoin("furnaces as f", "f.id", "r.furnace_id")
    .select(["r.id", "f.max_cool_rate_c_per_min"])
    .where("r.profile_id", "=", profileId)
    .where("r.state", "=", "draft")
    .execute();
  for (const d of drafts) {
    await trx.updateTable("furnace_runs").set({ cycle_minutes: cycleMinutesFor(profile, { max_cool_rate_c_per_min: Number(d.max_cool_rate_c_per_min) }) }).where("id", "=", d.id).execute();
  }
}
