import { AppError } from "@/lib/errors";
import { currentLayout } from "@/lib/batches/rules";
import type { BoardFurnace, BoardFurnaceRun, BoardProfile, BoardUnit, RunDetail } from "@/lib/batches/types";
import { profileCurve } from "@/lib/process/furnace-profile";
import { findFurnace, listFurnaceRuns, listProfiles, loadShopContext, type Db, type ShopContext } from "@/db/batches/reads";
import { profileForCycle } from "@/lib/batches/board-unit";
import { unitsWithPart } from "@/db/units/joins";

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

export type RunSheetData = {
  shop_name: string;
  detail: RunDetail;
  notes: string;
  operator: string | null;
  units: Array<{ id: string; customer: string; material_name: string; revision: string; green_mass_g: number | null }>;
};

/** The printed run sheet: the run page's detail, plus who started it and each unit's customer, material name and green mass. */
export async function loadRunSheet(db: Db, id: string): Promise<RunSheetData> {
  const detail = await getRunDetail(db, await loadShopContext(db), id);
  const [head, shop, units] = await Promise.all([
    db.selectFrom("furnace_runs as r").leftJoin("users as us", "us.id", "r.started_by").select(["r.notes", "us.name as operator"]).where("r.id", "=", id).executeTakeFirstOrThrow(),
    db.selectFrom("shop_settings").select("shop_name").where("id", "=", 1).executeTakeFirst(),
    detail.run.units.length
      ? unitsWithPart(db)
          .select(["u.id", "o.customer", "m.name as material_name", "p.revision", "u.green_mass_g"])
          .where("u.id", "in", detail.run.units.map((u) => u.id))
          .execute()
      : Promise.resolve([]),
  ]);
  return {
    shop_name: shop?.shop_name ?? "Hearth",
    detail,
    notes: head.notes,
    operator: head.operator,
    units: units.map((u) => ({ ...u, green_mass_g: u.green_mass_g === null ? null : Number(u.green_mass_g) })),
  };
}
