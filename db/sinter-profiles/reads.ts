import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import type { ProfileListItem } from "@/lib/batches/types";
import { listProfiles, type Db } from "@/db/batches/reads";
import { cycleMinutesFor } from "@/lib/batches/board-unit";

export async function listProfilesForSetup(db: Db): Promise<ProfileListItem[]> {
  const profiles = await listProfiles(db, { includeRetired: true });
  if (!profiles.length) return [];
  const ids = profiles.map((p) => p.id);
  const [rows, furnaces, runs] = await Promise.all([
    db.selectFrom("sinter_profiles").select(["id", "version", "notes", "retired", "supersedes_id"]).where("id", "in", ids).execute(),
    db.selectFrom("furnace_profiles").select(["furnace_id", "profile_id"]).where("profile_id", "in", ids).execute(),
    db
      .selectFrom("furnace_runs")
      .select(["profile_id", "state", (eb) => eb.fn.countAll<number>().as("n")])
      .where("profile_id", "in", ids)
      .groupBy(["profile_id", "state"])
      .execute(),
  ]);
  return profiles.map((p) => {
    const row = rows.find((r) => r.id === p.id)!;
    const count = (states: string[]) => runs.filter((r) => r.profile_id === p.id && states.includes(r.state)).reduce((s, r) => s + Number(r.n), 0);
    let cycle = 0;
    try {
      cycle = cycleMinutesFor(p);
    } catch {
      cycle = 0;
    }
    return {
      ...p,
      version: row.version,
      notes: row.notes,
      retired: row.retired,
      supersedes_id: row.supersedes_id,
      superseded_by: rows.find((r) => r.supersedes_id === p.id)?.id ?? null,
      furnace_ids: furnaces.filter((f) => f.profile_id === p.id).map((f) => f.furnace_id),
      cycle_minutes: cycle,
      booked_runs: count(["scheduled", "running", "complete"]),
      draft_runs: count(["draft"]),
    };
  });
}

export async function getProfileOrThrow(db: Db, id: string): Promise<ProfileListItem> {
  const all = await listProfilesForSetup(db);
  const p = all.find((x) => x.id === id);
  if (!p) throw new AppError("not_found", "That sinter profile does not exist.");
  return p;
}

export async function listMaterialsAndFurnaces(db: Database) {
  const [materials, furnaces] = await Promise.all([
    db.selectFrom("materials").select(["id", "code", "name", "default_profile_id"]).orderBy("code").execute(),
    db.selectFrom("furnaces").select(["id", "name", "max_cool_rate_c_per_min", "active"]).orderBy("name").execute(),
  ]);
  return { materials, furnaces: furnaces.map((f) => ({ ...f, max_cool_rate_c_per_min: Number(f.max_cool_rate_c_per_min) })) };
}
