import { sql, type Transaction } from "kysely";
import { isUuid } from "@/lib/ids";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { PART_SIZE_COLUMNS, unitsWithStages } from "@/db/units/joins";
import { AppError } from "@/lib/errors";
import { profileLabel } from "@/lib/batches/rules";
import { staffingOf, type Staffing } from "@/lib/batches/staffed";
import type {
Board,
BoardActive,
BoardFurnace,
BoardFurnaceRun,
BoardMaterial,
BoardProfile,
BoardStation,
BoardUnit,
BoardWashBatch,
BookingState,
UnitState,
} from "@/lib/batches/types";
import { byRisk, mostAtRisk, prepareBoardUnit, toBoardUnit, type PreparedBoardUnit, type WaitingLane } from "@/lib/batches/board-unit";
import type { TrayRun } from "@/lib/packing/types";
import { boardCache, waitingWashCache, waitingWashRowsCache } from "@/lib/batches/board-cache";
import { changeStamp } from "@/db/live/stamps";
import { WindowBody } from "@/lib/floor/window-body";

export type Db = Database | Transaction<DB>;

const num = (v: unknown): number => Number(v);
const numOrNull = (v: unknown): number | null => (v === null || v === undefined ? null : Number(v));
const iso = (d: Date | string | null | undefined): string | null => (d ? new Date(d).toISOString() : null);

/** Everything about the shop that the batching rules read: settings, profiles, equipment. */
export interface ShopContext {
  now: Date;
  time_zone: string;
  staffing: Staffing;
  clearance_mm: number;
  drying_minutes: number;
  finishing_lead_minutes: number;
  at_risk_margin_minutes: number;
  profiles: BoardProfile[];
  furnaces: BoardFurnace[];
  stations: BoardStation[];
  materials: BoardMaterial[];
}

export async function listProfiles(db: Db, opts: { includeRetired?: boolean; ids?: string[] } = {}): Promise<BoardProfile[]> {
  let q = db
    .selectFrom("sinter_profiles")
    .select(["id", "code", "revision", "name", "atmosphere", "start_temp_c", "cool_rate_c_per_min", "cool_to_c", "retired"])
    .orderBy("code")
    .orderBy("revision");
  if (!opts.includeRetired) q = q.where("retired", "=", false);
  if (opts.ids) q = opts.ids.length ? q.where("id", "in", opts.ids) : q.where(sql<boolean>`false`);
  const rows = await q.execute();
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const [segments, mats] = await Promise.all([
    db.selectFrom("sinter_profile_segments").select(["profile_id", "position", "rate_c_per_min", "setpoint_c", "hold_min"]).where("profile_id", "in", ids).orderBy("position").execute(),
    db.selectFrom("sinter_profile_materials").select(["profile_id", "material_id"]).where("profile_id", "in", ids).execute(),
  ]);
  return rows.map((r) => ({
    id: r.id,
    code: r.code,
    revision: r.revision,
    label: profileLabel(r),
    name: r.name,
    atmosphere: r.atmosphere,
    start_temp_c: num(r.start_temp_c),
    cool_rate_c_per_min: num(r.cool_rate_c_per_min),
    cool_to_c: num(r.cool_to_c),
    material_ids: mats.filter((m) => m.profile_id === r.id).map((m) => m.material_id),
    segments: segments
      .filter((s) => s.profile_id === r.id)
      .map((s) => ({ position: s.position, rate_c_per_min: num(s.rate_c_per_min), setpoint_c: num(s.setpoint_c), hold_min: num(s.hold_min) })),
  }));
}

export async function loadShopContext(db: Db, now = new Date()): Promise<ShopContext> {
  // Independent reads, asked together: on the pool they run side by side (withBatchTransaction).
  const [settings, furnaces, links, stations, materials, used, profiles] = await Promise.all([
    db.selectFrom("shop_settings").selectAll().where("id", "=", 1).executeTakeFirst(),
    db.selectFrom("furnaces").selectAll().where("active", "=", true).orderBy("name").execute(),
    db.selectFrom("furnace_profiles").select(["furnace_id", "profile_id"]).execute(),
    db.selectFrom("wash_stations").selectAll().where("active", "=", true).orderBy("name").execute(),
    db.selectFrom("materials").select(["id", "code", "name", "default_profile_id", "min_mass_loss"]).where("active", "=", true).orderBy("code").execute(),
    // Runs already booked keep their (maybe retired) revision: load those too.
    db.selectFrom("furnace_runs").select("profile_id").distinct().where("state", "in", ["draft", "scheduled", "running"]).execute(),
    listProfiles(db),
  ]);
  const missing = used.map((u) => u.profile_id).filter((pid) => !profiles.some((p) => p.id === pid));
  if (missing.length) profiles.push(...(await listProfiles(db, { includeRetired: true, ids: missing })));
  const timeZone = settings?.time_zone ?? "UTC";
  return {
    now,
    time_zone: timeZone,
    staffing: staffingOf(settings?.staffed_hours, timeZone),
    clearance_mm: num(settings?.tray_clearance_mm ?? 5),
    drying_minutes: num(settings?.drying_minutes ?? 0),
    finishing_lead_minutes: num(settings?.finishing_lead_minutes ?? 0),
    at_risk_margin_minutes: num(settings?.at_risk_margin_minutes ?? 0),
    profiles,
    furnaces: furnaces.map((f) => ({
      id: f.id,
      name: f.name,
      tray_x_mm: num(f.tray_x_mm),
      tray_y_mm: num(f.tray_y_mm),
      tray_count: f.tray_count,
      usable_height_mm: num(f.usable_height_mm),
      max_load_g: num(f.max_load_g),
      max_cool_rate_c_per_min: num(f.max_cool_rate_c_per_min),
      profile_ids: links.filter((l) => l.furnace_id === f.id).map((l) => l.profile_id),
    })),
    stations: stations.map((s) => ({
      id: s.id,
      name: s.name,
      solvent: s.solvent,
      basket_x_mm: num(s.basket_x_mm),
      basket_y_mm: num(s.basket_y_mm),
      basket_z_mm: num(s.basket_z_mm),
      capacity_units: s.capacity_units,
      max_load_g: num(s.max_load_g),
    })),
    materials: materials.map((m) => ({ id: m.id, code: m.code, name: m.name, default_profile_id: m.default_profile_id, min_mass_loss: num(m.min_mass_loss) })),
  };
}

/** Equipment rows the context skips because they are inactive, when a booking still names them. */
export async function findFurnace(db: Db, ctx: ShopContext, id: string): Promise<BoardFurnace | undefined> {
  const known = ctx.furnaces.find((f) => f.id === id);
  if (known) return known;
  const f = await db.selectFrom("furnaces").selectAll().where("id", "=", id).executeTakeFirst();
  if (!f) return undefined;
  const links = await db.selectFrom("furnace_profiles").select("profile_id").where("furnace_id", "=", id).execute();
  return {
    id: f.id, name: f.name, tray_x_mm: num(f.tray_x_mm), tray_y_mm: num(f.tray_y_mm), tray_count: f.tray_count,
    usable_height_mm: num(f.usable_height_mm), max_load_g: num(f.max_load_g), max_cool_rate_c_per_min: num(f.max_cool_rate_c_per_min),
    profile_ids: links.map((l) => l.profile_id),
  };
}

export type UnitFilter =
  | { kind: "ids"; ids: string[] }
  | { kind: "wash_batch"; ids: string[] }
  | { kind: "furnace_run"; ids: string[] }
  | { kind: "waiting_wash" }
  | { kind: "waiting_furnace"; horizon?: Date };

function unitQuery(db: Db) {
  return unitsWithStages(db)
    .select([
      "u.id", "u.serial", "u.version", "u.state", "u.green_mass_g", "u.brown_mass_g", "u.wash_passed", "u.hold_reason",
      "u.wash_batch_id", "u.furnace_run_id",
      "p.id as part_id", "p.part_number", "p.name as part_name", "p.thickest_wall_mm", "p.volume_mm3",
      ...PART_SIZE_COLUMNS,
      "o.code as order_code", "o.due_at", "o.priority",
      "m.id as material_id", "m.code as material_code", "m.default_profile_id", "m.shrink_xy", "m.shrink_z",
      "m.green_density_g_cm3", "m.wash_k_min_per_mm2", "m.wash_min_minutes", "m.min_mass_loss",
      "w.state as wb_state", "w.starts_at as wb_starts_at", "w.ends_at as wb_ends_at",
      "r.state as fr_state", "r.starts_at as fr_starts_at", "r.ends_at as fr_ends_at",
    ]);
}

export async function listBoardUnits(db: Db, ctx: ShopContext, filter: UnitFilter): Promise<BoardUnit[]> {
  const rows = await unitRows(db, ctx, filter);
  const units = rows.map((r) => toBoardUnit(r, ctx));
  if (filter.kind === "waiting_wash" || filter.kind === "waiting_furnace") units.sort(byRisk);
  return units;
}

function unitRows(db: Db, ctx: ShopContext, filter: UnitFilter) {
  let q = unitQuery(db);
  switch (filter.kind) {
    case "ids":
      if (!filter.ids.length) return [];
      q = q.where("u.id", "in", filter.ids);
      break;
    case "wash_batch":
      if (!filter.ids.length) return [];
      q = q.where("u.wash_batch_id", "in", filter.ids);
      break;
    case "furnace_run":
      if (!filter.ids.length) return [];
      q = q.where("u.furnace_run_id", "in", filter.ids);
      break;
    case "waiting_wash":
      q = q
        .where("u.state", "=", "green")
        .where((eb) => eb.or([eb("u.wash_batch_id", "is", null), eb("w.state", "in", ["complete", "cancelled"])]));
      break;
    case "waiting_furnace": {
      const horizon = filter.horizon ?? new Date(ctx.now.getTime() + 48 * 3_600_000);
      q = q
        .where((eb) =>
          eb.or([
            eb("u.state", "=", "brown"),
            eb.and([
              eb("u.state", "=", "washing"),
              eb.or([eb("u.wash_passed", "is", null), eb("u.wash_passed", "=", true)]),
              eb("w.ends_at", "<=", horizon),
            ]),
          ]),
        )
        .where((eb) => eb.or([eb("u.furnace_run_id", "is", null), eb("r.state", "in", ["complete", "cancelled"])]));
      break;
    }
  }
  return q.orderBy("o.due_at").orderBy("u.serial").execute();
}

/** Rows prepared between turns of the event loop, so that other requests are answered meanwhile. */
const PREPARE_CHUNK = 500;
const nextTurn = () => new Promise<void>((resolve) => setImmediate(resolve));

/** The units waiting for a wash, worked from their rows (lib/batches/board-unit.ts), not yet projected. */
export async function prepareWaitingWash(db: Db, ctx: ShopContext): Promise<PreparedBoardUnit[]> {
  const rows = await unitRows(db, ctx, { kind: "waiting_wash" });
  const out: PreparedBoardUnit[] = [];
  for (let i = 0; i < rows.length; i += PREPARE_CHUNK) {
    if (i > 0) await nextTurn();
    for (const r of rows.slice(i, i + PREPARE_CHUNK)) out.push(prepareBoardUnit(r, ctx));
  }
  return out;
}

type WashRow = { id: string; code: string; state: BookingState; version: number; wash_station_id: string | null; starts_at: Date | null; ends_at: Date | null; est_minutes: unknown; started_at: Date | null; finished_at: Date | null };
type RunRow = { id: string; code: string; state: BookingState; version: number; furnace_id: string | null; profile_id: string; starts_at: Date | null; ends_at: Date | null; cycle_minutes: unknown; tray_layout: unknown };

export function toBoardWash(w: WashRow, units: BoardUnit[]): BoardWashBatch {
  return {
    id: w.id, code: w.code, state: w.state, version: w.version, wash_station_id: w.wash_station_id ?? "",
    starts_at: iso(w.starts_at), ends_at: iso(w.ends_at), est_minutes: numOrNull(w.est_minutes),
    started_at: iso(w.started_at), finished_at: iso(w.finished_at),
    units: units.filter((u) => u.wash_batch_id === w.id),
  };
}

export function toBoardRun(r: RunRow, units: BoardUnit[]): BoardFurnaceRun {
  return {
    id: r.id, code: r.code, state: r.state, version: r.version, furnace_id: r.furnace_id ?? "", profile_id: r.profile_id,
    starts_at: iso(r.starts_at), ends_at: iso(r.ends_at), cycle_minutes: numOrNull(r.cycle_minutes),
    tray_layout: (r.tray_layout as TrayRun | null) ?? null,
    units: units.filter((u) => u.furnace_run_id === r.id),
  };
}

const WASH_COLUMNS = ["id", "code", "state", "version", "wash_station_id", "starts_at", "ends_at", "est_minutes", "started_at", "finished_at"] as const;
const RUN_COLUMNS = ["id", "code", "state", "version", "furnace_id", "profile_id", "starts_at", "ends_at", "cycle_minutes", "tray_layout"] as const;

export async function listWashBatches(db: Db, ctx: ShopContext, opts: { states?: BookingState[]; ids?: string[] }): Promise<BoardWashBatch[]> {
  let q = db.selectFrom("wash_batches").select([...WASH_COLUMNS]).orderBy("starts_at").orderBy("code");
  if (opts.states) q = q.where("state", "in", opts.states);
  if (opts.ids) {
    if (!opts.ids.length) return [];
    q = q.where("id", "in", opts.ids);
  }
  const rows = await q.execute();
  const units = await listBoardUnits(db, ctx, { kind: "wash_batch", ids: rows.map((r) => r.id) });
  return rows.map((r) => toBoardWash(r, units));
}

export async function listFurnaceRuns(db: Db, ctx: ShopContext, opts: { states?: BookingState[]; ids?: string[] }): Promise<BoardFurnaceRun[]> {
  let q = db.selectFrom("furnace_runs").select([...RUN_COLUMNS]).orderBy("starts_at").orderBy("code");
  if (opts.states) q = q.where("state", "in", opts.states);
  if (opts.ids) {
    if (!opts.ids.length) return [];
    q = q.where("id", "in", opts.ids);
  }
  const rows = await q.execute();
  const units = await listBoardUnits(db, ctx, { kind: "furnace_run", ids: rows.map((r) => r.id) });
  return rows.map((r) => toBoardRun(r, units));
}

async function listActive(db: Db, now: Date): Promise<BoardActive[]> {
  const weekAgo = new Date(now.getTime() - 7 * 86_400_000);
  const [washes, runs] = await Promise.all([
    db
      .selectFrom("wash_batches as w")
      .leftJoin("wash_stations as s", "s.id", "w.wash_station_id")
      .select(["w.id", "w.code", "w.state", "w.starts_at", "w.ends_at", "s.name as resource_name", sql<number>`(select count(*) from units u where u.wash_batch_id = w.id)`.as("unit_count")])
      .where("w.state", "=", "running")
      .orderBy("w.ends_at")
      .execute(),
    db
      .selectFrom("furnace_runs as r")
      .leftJoin("furnaces as f", "f.id", "r.furnace_id")
      .select(["r.id", "r.code", "r.state", "r.starts_at", "r.ends_at", "f.name as resource_name", sql<number>`(select count(*) from units u where u.furnace_run_id = r.id)`.as("unit_count")])
      .where((eb) => eb.or([eb("r.state", "=", "running"), eb.and([eb("r.state", "=", "complete"), eb("r.unloaded_at", "is", null), eb("r.ends_at", ">", weekAgo)])]))
      .orderBy("r.ends_at")
      .execute(),
  ]);
  return [
    ...washes.map((w) => ({ kind: "wash_batch" as const, id: w.id, code: w.code, state: w.state, resource_name: w.resource_name ?? "", starts_at: iso(w.starts_at), ends_at: iso(w.ends_at), unit_count: Number(w.unit_count), needs: "weighing" as const })),
    ...runs.map((r) => ({
      kind: "furnace_run" as const, id: r.id, code: r.code, state: r.state, resource_name: r.resource_name ?? "", starts_at: iso(r.starts_at), ends_at: iso(r.ends_at), unit_count: Number(r.unit_count),
      needs: r.state === "complete" || (r.ends_at && new Date(r.ends_at) <= now) ? ("unload" as const) : null,
    })),
  ];
}

/** Moves on every change to anything the board shows (migration 202612040510). */
export function boardChangeStamp(db: Db): Promise<string> {
  return changeStamp(db, "board");
}

/** The board's encoded body, from the process-wide cache while the stamp holds. */
export function boardBody(db: Db, stamp: string): Promise<WindowBody> {
  return boardCache().get("board", stamp, async () => WindowBody.ready(JSON.stringify(await loadBoard(db, new Date(), sharedWaitingWash))));
}

/**
 * The units waiting for a wash, every one projected (the board shows the 200 most at risk and
 * the total): by far the board's costliest part (a shop with ten thousand green parts spent a
 * third of a second of CPU on it, holding every other request of the process), and one that a
 * booked wash batch moving in time does not touch. So it is kept apart, per its own stamp
 * (waiting_wash_seq, migration 202612041152: units, parts, orders, materials, profiles, settings,
 * furnace runs, and a wash batch's state, not its slot), in two layers (lib/batches/board-cache.ts):
 * the units worked from their rows, loaded again only when the stamp moves (or after a minute),
 * and their projection at the board's "now", worked again from those every ten seconds (a lookup
 * per unit). The live listener clears both on any change that can alter them (app/_server/live-hub.ts).
 */
async function sharedWaitingWash(db: Db, ctx: ShopContext): Promise<WaitingLane> {
  const { rows } = await sql<{ v: string }>`select last_value::text || ':' || is_called::text as v from waiting_wash_seq`.execute(db);
  const stamp = rows[0].v;
  return waitingWashCache().get("waiting_wash", stamp, async () => mostAtRisk(await waitingWashRowsCache().get("waiting_wash", stamp, () => prepareWaitingWash(db, ctx)), ctx, BOARD_WAITING_LIMIT));
}

/** Waiting units the board lists per lane, most at risk first (the suggestions still see all). */
export const BOARD_WAITING_LIMIT = 200;

const waitingLane = async (d: Db, ctx: ShopContext, kind: "waiting_wash" | "waiting_furnace"): Promise<WaitingLane> => {
  const units = await listBoardUnits(d, ctx, { kind });
  return { units: units.slice(0, BOARD_WAITING_LIMIT), total: units.length };
};

export async function loadBoard(db: Db, now = new Date(), waitingWash = (d: Db, ctx: ShopContext) => waitingLane(d, ctx, "waiting_wash")): Promise<Board> {
  const ctx = await loadShopContext(db, now);
  const [washWaiting, furnaceWaiting, washes, runs, active] = await Promise.all([
    waitingWash(db, ctx),
    waitingLane(db, ctx, "waiting_furnace"),
    listWashBatches(db, ctx, { states: ["draft", "scheduled"] }),
    listFurnaceRuns(db, ctx, { states: ["draft", "scheduled"] }),
    listActive(db, now),
  ]);
  return {
    now: now.toISOString(),
    time_zone: ctx.time_zone,
    clearance_mm: ctx.clearance_mm,
    drying_minutes: ctx.drying_minutes,
    wash_waiting: washWaiting.units,
    furnace_waiting: furnaceWaiting.units,
    wash_waiting_total: washWaiting.total,
    furnace_waiting_total: furnaceWaiting.total,
    wash_batches: washes,
    furnace_runs: runs,
    active,
    stations: ctx.stations,
    furnaces: ctx.furnaces,
    profiles: ctx.profiles,
    materials: ctx.materials,
  };
}

/** A path id that is not a uuid names nothing: 404, never a database error. */
export function pathId(id: string, what: string): string {
  if (!isUuid(id)) throw new AppError("not_found", `That ${what} does not exist.`);
  return id;
}

/** Bookings of wash stations and furnaces that touch a window, for the floor's lanes. */
export async function listLaneBookings(db: Db, kind: "wash" | "furnace", from: Date, to: Date) {
  if (kind === "wash") {
    return db
      .selectFrom("wash_batches as w")
      .select(["w.id", "w.code", "w.state", "w.version", "w.wash_station_id as resource_id", "w.starts_at", "w.ends_at", "w.est_minutes as minutes", sql<number>`(select count(*) from units u where u.wash_batch_id = w.id)`.as("unit_count")])
      .where("w.state", "in", ["scheduled", "running", "complete"])
      .where(sql<boolean>`tstzrange(w.starts_at, w.ends_at) && tstzrange(${from}::timestamptz, ${to}::timestamptz)`)
      .orderBy("w.starts_at")
      .execute();
  }
  return db
    .selectFrom("furnace_runs as r")
    .innerJoin("sinter_profiles as p", "p.id", "r.profile_id")
    .select(["r.id", "r.code", "r.state", "r.version", "r.furnace_id as resource_id", "r.starts_at", "r.ends_at", "r.cycle_minutes as minutes", "p.code as profile_code", "p.revision as profile_revision", sql<number>`(select count(*) from units u where u.furnace_run_id = r.id)`.as("unit_count")])
    .where("r.state", "in", ["scheduled", "running", "complete"])
    .where(sql<boolean>`tstzrange(r.starts_at, r.ends_at) && tstzrange(${from}::timestamptz, ${to}::timestamptz)`)
    .orderBy("r.starts_at")
    .execute();
}

export async function findShopTimeZone(db: Db): Promise<string> {
  const row = await db.selectFrom("shop_settings").select("time_zone").where("id", "=", 1).executeTakeFirst();
  return row?.time_zone ?? "UTC";
}
