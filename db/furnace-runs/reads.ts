import { AppError } from "@/lib/errors";
import { currentLayout } from "@/lib/batches/rules";
import type { BoardFurnace, BoardFurnaceRun, BoardProfile, BoardUnit, RunDetail } from "@/lib/batches/types";
import { profileCurve } from "@/lib/process/furnace-profile";
import { findFurnace, listFurnaceRuns, listProfiles, profileForCycle, type Db, type ShopContext } from "@/db/batches/reads";

export const refuse = (code: string, reason: string, field = "unit_id") => new AppError("invalid", reason, { [field]: [reason] }, { rule: code });

export async function getRun(db: Db, ctx: ShopContext, id: string): Promise<BoardFurnaceRun> {
  const [r] = await listFurnaceRuns(db, ctx, { ids: [id] });
  if (!r) throw new AppError("not_found", "That furnace run does not exist.");
  return r;
}

export async function profileOf(db: Db, ctx: ShopContext, id: string): Promise<BoardProfile> {
  const known = ctx.profiles.find((p) => p.id === id);
  if (known) return known;
  const [p] = await listProfiles(db, { includeRetired: true, ids: [id] });
  if (!p) throw refuse("profile", "That sinter profile does not exist.", "profile_id");
  ctx.profiles.push(p);
  return p;
}

export async function furnaceOf(db: Db, ctx: ShopContext, id: string | null): Promise<BoardFurnace> {
  const f = id ? await findFurnace(db, ctx, id) : undefined;
  if (!f) throw refuse("furnace", "That furnace does not exist.", "furnace_id");
  return f;
}

export async function getRunDetail(db: Db, ctx: ShopContext, id: string): Promise<RunDetail> {
  const run = await getRun(db, ctx, id);
  const furnace = await furnaceOf(db, ctx, run.furnace_id);
  const profile = await profileOf(db, ctx, run.profile_id);
  const curve = profileCurve(profileForCycle(profile), { maxCoolRateCPerMin: furnace.max_cool_rate_c_per_min }, 5);
  const extra = await db.selectFrom("furnace_runs").select(["checklist", "loaded_at", "unloaded_at"]).where("id", "=", id).executeTakeFirstOrThrow();
  const unitRows = run.units.length
    ? await db.selectFrom("units").select(["id", "serial", "state", "scrap_reason", "scrap_note"]).where("id", "in", run.units.map((u) => u.id)).orderBy("serial").execute()
    : [];
  let layout = run.tray_layout;
  if (run.units.length) {
    const current = currentLayout(run.tray_layout, run.units, furnace, profile, ctx.profiles, ctx.clearance_mm);
    if (current.ok) layout = current.layout;
  }
  return {
    run: { ...run, tray_layout: layout },
    furnace,
    profile,
    curve: curve.map((p) => ({ minute: Math.round(p.minute * 10) / 10, temp_c: Math.round(p.tempC * 10) / 10, phase: p.phase })),
    cycle: { total_minutes: curve[curve.length - 1].minute },
    checklist: (extra.checklist as Record<string, unknown> | null) ?? null,
    loaded_at: extra.loaded_at ? new Date(extra.loaded_at).toISOString() : null,
    unloaded_at: extra.unloaded_at ? new Date(extra.unloaded_at).toISOString() : null,
    outcomes: unitRows.map((u) => ({ unit_id: u.id, serial: u.serial, state: u.state, scrap_reason: u.scrap_reason, scrap_note: u.scrap_note })),
    now: ctx.now.toISOString(),
    time_zone: ctx.time_zone,
    clearance_mm: ctx.clearance_mm,
    profiles: ctx.profiles,
  };
}

export type { BoardUnit };

export async function findRunCode(db: Db, id: string): Promise<string | undefined> {
  const row = await db.selectFrom("furnace_runs").select("code").where("id", "=", id).executeTakeFirst();
  return row?.code;
}
