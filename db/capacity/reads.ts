import { createHash } from "node:crypto";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import { unitsWithStages } from "@/db/units/joins";
import { orderRisks, type OrderForRisk, type ShopTiming, type UnitForProjection } from "@/lib/capacity/projection-input";
import {
queueAhead,
rangeInstants,
utilizationReport,
weeklyThroughput,
wipByState,
type CapacityResource,
} from "@/lib/capacity/summary";
import type { CapacityQuery, ResourceKind } from "@/lib/capacity/schemas";
import type { CapacityView } from "@/lib/capacity/types";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import { printMinutes } from "@/lib/process/print-time";
import { washMinutes } from "@/lib/process/wash";
import { weeklyPatternSchema, type WeeklyPattern } from "@/lib/process/time-zone";

// Everything the capacity view shows, read in a handful of queries and computed in lib/.

const OCCUPYING = ["scheduled", "running", "complete"] as const;
const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

export type ShopClock = ShopTiming & { time_zone: string; shop_name: string };

export async function loadShopClock(db: Database): Promise<ShopClock> {
  const row = await db
    .selectFrom("shop_settings")
    .select(["shop_name", "time_zone", "staffed_hours", "drying_minutes", "finishing_lead_minutes", "at_risk_margin_minutes"])
    .where("id", "=", 1)
    .executeTakeFirst();
  // A shop that has not set staffed hours (or set ones that do not parse) is projected as if
  // someone were always there, rather than not at all.
  const parsed = weeklyPatternSchema.safeParse(row?.staffed_hours ?? []);
  const pattern: WeeklyPattern = parsed.success ? parsed.data : [];
  const time_zone = row?.time_zone ?? "UTC";
  return {
    shop_name: row?.shop_name ?? "Hearth",
    time_zone,
    drying_minutes: row?.drying_minutes ?? 120,
    finishing_lead_minutes: row?.finishing_lead_minutes ?? 1440,
    at_risk_margin_minutes: row?.at_risk_margin_minutes ?? 1440,
    staffing: pattern.length ? { pattern, timeZone: time_zone } : undefined,
  };
}

export type ResourceRef = { id: string; kind: ResourceKind; name: string };

export async function listResources(db: Database): Promise<ResourceRef[]> {
  const [printers, washes, furnaces] = await Promise.all([
    db.selectFrom("printers").select(["id", "name"]).where("active", "=", true).orderBy("name").execute(),
    db.selectFrom("wash_stations").select(["id", "name"]).where("active", "=", true).orderBy("name").execute(),
    db.selectFrom("furnaces").select(["id", "name"]).where("active", "=", true).orderBy("name").execute(),
  ]);
  return [
    ...printers.map((r) => ({ ...r, kind: "printer" as const })),
    ...washes.map((r) => ({ ...r, kind: "wash_station" as const })),
    ...furnaces.map((r) => ({ ...r, kind: "furnace" as const })),
  ];
}

export type BookingRow = { id: string; code: string; state: string; version: number; starts_at: Date; ends_at: Date; resource_id: string; kind: ResourceKind; label: string };

/** Bookings that occupy a resource and touch [from, to). */
export async function listBookings(db: Database, from: Date, to: Date, resourceId?: string): Promise<BookingRow[]> {
  const touches = sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${from}::timestamptz, ${to}::timestamptz)`;
  let builds = db
    .selectFrom("builds as b")
    .innerJoin("materials as m", "m.id", "b.material_id")
    .select(["b.id", "b.code", "b.state", "b.version", "b.starts_at", "b.ends_at", "b.printer_id as resource_id", "m.code as label"])
    .where("b.state", "in", OCCUPYING)
    .where("b.printer_id", "is not", null)
    .where(touches);
  let washes = db
    .selectFrom("wash_batches as w")
    .select(["w.id", "w.code", "w.state", "w.version", "w.starts_at", "w.ends_at", "w.wash_station_id as resource_id", sql<string>`'wash'`.as("label")])
    .where("w.state", "in", OCCUPYING)
    .where("w.wash_station_id", "is not", null)
    .where(touches);
  let runs = db
    .selectFrom("furnace_runs as r")
    .innerJoin("sinter_profiles as sp", "sp.id", "r.profile_id")
    .select(["r.id", "r.code", "r.state", "r.version", "r.starts_at", "r.ends_at", "r.furnace_id as resource_id", "sp.code as label"])
    .where("r.state", "in", OCCUPYING)
    .where("r.furnace_id", "is not", null)
    .where(touches);
  if (resourceId) {
    builds = builds.where("b.printer_id", "=", resourceId);
    washes = washes.where("w.wash_station_id", "=", resourceId);
    runs = runs.where("r.furnace_id", "=", resourceId);
  }
  const [b, w, r] = await Promise.all([builds.execute(), washes.execute(), runs.execute()]);
  const rows = (list: typeof b, kind: ResourceKind) =>
    list.map((x) => ({ ...x, kind, resource_id: x.resource_id!, starts_at: new Date(x.starts_at!), ends_at: new Date(x.ends_at!) }));
  return [...rows(b, "printer"), ...rows(w, "wash_station"), ...rows(r, "furnace")];
}

export type MaintenanceRow = { id: string; resource_id: string; starts_at: Date; ends_at: Date; reason: string };

export async function listMaintenance(db: Database, from: Date, to: Date, resourceId?: string): Promise<MaintenanceRow[]> {
  let q = db
    .selectFrom("maintenance_windows")
    .select(["id", "starts_at", "ends_at", "reason", sql<string>`coalesce(printer_id, wash_station_id, furnace_id)`.as("resource_id")])
    .where(sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${from}::timestamptz, ${to}::timestamptz)`);
  if (resourceId) q = q.where(sql<boolean>`coalesce(printer_id, wash_station_id, furnace_id) = ${resourceId}`);
  return (await q.execute()).map((m) => ({ ...m, starts_at: new Date(m.starts_at), ends_at: new Date(m.ends_at) }));
}

/** Units of open orders with what the projection needs, grouped by order; `dueBefore` keeps those due by then. */
export async function listOpenOrdersForRisk(db: Database, opts: { dueBefore?: Date } = {}): Promise<OrderForRisk[]> {
  let query = unitsWithStages(db)
    .select([
      "u.id as unit_id", "u.serial", "u.state", "u.held_from", "u.state_changed_at",
      "o.id as order_id", "o.code as order_code", "o.customer", "o.due_at", "o.priority",
      "p.material_id", "p.volume_mm3", "p.thickest_wall_mm", "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm",
      "p.green_x_mm", "p.green_y_mm", "p.green_z_mm", "m.shrink_xy", "m.shrink_z", "m.wash_k_min_per_mm2", "m.wash_min_minutes",
      "b.state as b_state", "b.starts_at as b_start", "b.ends_at as b_end", "b.finished_at as b_finished", "b.est_minutes as b_est",
      "w.state as w_state", "w.starts_at as w_start", "w.ends_at as w_end",
      "r.state as r_state", "r.starts_at as r_start", "r.ends_at as r_end", "r.unloaded_at as r_unloaded",
    ])
    .where((eb) =>
      eb.exists(eb.selectFrom("units as open").innerJoin("parts as op", "op.id", "open.part_id").select(sql`1`.as("one")).where("op.order_id", "=", eb.ref("o.id")).where("open.state", "not in", ["done", "scrapped"])),
    )
    .orderBy("o.due_at")
    .orderBy("u.serial");
  if (opts.dueBefore) query = query.where("o.due_at", "<=", opts.dueBefore);
  const rows = await query.execute();
  const ctx = await loadEstimateContext(db);
  const orders = new Map<string, OrderForRisk>();
  for (const r of rows) {
    let order = orders.get(r.order_id);
    if (!order) {
      order = { id: r.order_id, code: r.order_code, customer: r.customer, due_at: new Date(r.due_at), priority: r.priority, units: [] };
      orders.set(r.order_id, order);
    }
    const greenX = num(r.green_x_mm) ?? Number(r.nominal_x_mm) / (1 - Number(r.shrink_xy));
    const greenY = num(r.green_y_mm) ?? Number(r.nominal_y_mm) / (1 - Number(r.shrink_xy));
    const greenZ = num(r.green_z_mm) ?? Number(r.nominal_z_mm) / (1 - Number(r.shrink_z));
    const volume = num(r.volume_mm3);
    const greenVolume = volume
      ? volume * (greenX / Number(r.nominal_x_mm)) * (greenY / Number(r.nominal_y_mm)) * (greenZ / Number(r.nominal_z_mm))
      : 0.5 * greenX * greenY * greenZ; // no geometry yet: half the bounding box
    const printer = ctx.printer.get(r.material_id);
    const print =
      num(r.b_est) ??
      (printer ? printMinutes({ greenVolumeMm3: greenVolume, heightMm: greenZ }, printer).totalMinutes : 24 * 60);
    const unit: UnitForProjection & { serial: string; id: string } = {
      id: r.unit_id,
      serial: r.serial,
      state: r.state,
      held_from: r.held_from,
      state_changed_at: new Date(r.state_changed_at),
      build: r.b_state ? { state: r.b_state, starts_at: r.b_start, ends_at: r.b_end, actual_end: r.b_finished } : null,
      wash: r.w_state ? { state: r.w_state, starts_at: r.w_start, ends_at: r.w_end } : null,
      run: r.r_state ? { state: r.r_state, starts_at: r.r_start, ends_at: r.r_end, actual_end: r.r_unloaded } : null,
      estimates: {
        print,
        wash: washMinutes({ thickestWallMm: Number(r.thickest_wall_mm), kMinPerMm2: Number(r.wash_k_min_per_mm2), minMinutes: Number(r.wash_min_minutes) }),
        furnace: ctx.cycle.get(r.material_id) ?? 24 * 60,
      },
    };
    order.units.push(unit);
  }
  return [...orders.values()];
}

type EstimateContext = {
  printer: Map<string, { depositionCm3PerH: number; layerHeightMm: number; layerOverheadS: number }>;
  cycle: Map<string, number>;
};

/** Fastest active printer per material and the cycle of each material's default profile. */
async function loadEstimateContext(db: Database): Promise<EstimateContext> {
  const [printers, materials, segments] = await Promise.all([
    db
      .selectFrom("printers as p")
      .innerJoin("printer_materials as pm", "pm.printer_id", "p.id")
      .select(["pm.material_id", "p.deposition_cm3_per_h", "p.layer_height_mm", "p.layer_overhead_s"])
      .where("p.active", "=", true)
      .execute(),
    db
      .selectFrom("materials as m")
      .innerJoin("sinter_profiles as sp", "sp.id", "m.default_profile_id")
      .select(["m.id", "sp.id as profile_id", "sp.start_temp_c", "sp.cool_rate_c_per_min", "sp.cool_to_c"])
      .execute(),
    db.selectFrom("sinter_profile_segments").select(["profile_id", "rate_c_per_min", "setpoint_c", "hold_min"]).orderBy("position").execute(),
  ]);
  const printer: EstimateContext["printer"] = new Map();
  for (const p of printers) {
    const have = printer.get(p.material_id);
    const rate = Number(p.deposition_cm3_per_h);
    if (!have || rate > have.depositionCm3PerH) {
      printer.set(p.material_id, { depositionCm3PerH: rate, layerHeightMm: Number(p.layer_height_mm), layerOverheadS: Number(p.layer_overhead_s) });
    }
  }
  const cycle = new Map<string, number>();
  for (const m of materials) {
    const segs = segments.filter((s) => s.profile_id === m.profile_id);
    if (!segs.length) continue;
    try {
      cycle.set(
        m.id,
        furnaceCycle({
          startTempC: Number(m.start_temp_c),
          coolRateCPerMin: Number(m.cool_rate_c_per_min),
          coolToC: Number(m.cool_to_c),
          segments: segs.map((s) => ({ rateCPerMin: Number(s.rate_c_per_min), setpointC: Number(s.setpoint_c), holdMin: Number(s.hold_min) })),
        }).totalMinutes,
      );
    } catch {
      // a profile that does not validate gives no estimate; a day is assumed instead
    }
  }
  return { printer, cycle };
}

export type Backlog = { kind: ResourceKind; count: number; hours: number | null; what: string };

/** Work waiting for a booking on each kind of resource. */
async function loadBacklog(db: Database): Promise<Backlog[]> {
  const [drafts, washWaiting, furnaceWaiting] = await Promise.all([
    db
      .selectFrom("builds")
      .select((eb) => [eb.fn.countAll<number>().as("n"), sql<number>`coalesce(sum(est_minutes), 0)`.as("minutes")])
      .where("state", "=", "draft")
      .executeTakeFirstOrThrow(),
    db
      .selectFrom("units as u")
      .leftJoin("wash_batches as w", "w.id", "u.wash_batch_id")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .where("u.state", "=", "green")
      .where((eb) => eb.or([eb("w.id", "is", null), eb("w.state", "in", ["draft", "cancelled"])]))
      .executeTakeFirstOrThrow(),
    db
      .selectFrom("units as u")
      .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id")
      .select((eb) => eb.fn.countAll<number>().as("n"))
      .where("u.state", "=", "brown")
      .where((eb) => eb.or([eb("r.id", "is", null), eb("r.state", "in", ["draft", "cancelled"])]))
      .executeTakeFirstOrThrow(),
  ]);
  return [
    { kind: "printer", count: Number(drafts.n), hours: Number(drafts.minutes) / 60, what: "draft builds not yet on a printer" },
    { kind: "wash_station", count: Number(washWaiting.n), hours: null, what: "green units not yet in a booked wash batch" },
    { kind: "furnace", count: Number(furnaceWaiting.n), hours: null, what: "brown units not yet in a booked furnace run" },
  ];
}

export async function loadCapacity(db: Database, query: CapacityQuery, now = new Date()): Promise<CapacityView> {
  const clock = await loadShopClock(db);
  const { from, to } = rangeInstants(query.from, query.to, clock.time_zone);
  // Bookings from the start of the range, or from now when the range lies in the past, so the
  // queue ahead is complete whatever range is shown.
  const earliest = new Date(Math.min(from.getTime(), now.getTime()));
  const latest = new Date(now.getTime() + 5 * 365 * 86_400_000);
  const [resources, bookings, maintenance, unitStates, events, orders, backlog] = await Promise.all([
    listResources(db),
    listBookings(db, earliest, latest),
    listMaintenance(db, from, to),
    db.selectFrom("units").select("state").where("state", "not in", ["done", "scrapped"]).execute(),
    db
      .selectFrom("events")
      .select(["created_at", "to_state"])
      .where("entity", "=", "unit")
      .where("kind", "=", "state")
      .where("to_state", "in", ["done", "sintered"])
      .where("created_at", ">=", from)
      .where("created_at", "<", to)
      .execute(),
    listOpenOrdersForRisk(db),
    loadBacklog(db),
  ]);
  const capacityResources: CapacityResource[] = resources.map((r) => ({
    ...r,
    bookings: bookings.filter((b) => b.resource_id === r.id).map((b) => ({ start: b.starts_at, end: b.ends_at })),
    maintenance: maintenance.filter((m) => m.resource_id === r.id).map((m) => ({ start: m.starts_at, end: m.ends_at })),
  }));
  const day = utilizationReport(capacityResources, from, to, clock.time_zone, "day");
  const week = utilizationReport(capacityResources, from, to, clock.time_zone, "week");
  return {
    shop_name: clock.shop_name,
    time_zone: clock.time_zone,
    now: now.toISOString(),
    range: { from: query.from, to: query.to, from_at: from.toISOString(), to_at: to.toISOString() },
    resources,
    utilization: { day, week },
    queue: queueAhead(capacityResources, now),
    backlog,
    wip: wipByState(unitStates),
    throughput: weeklyThroughput(events.map((e) => ({ at: new Date(e.created_at), to_state: e.to_state ?? "" })), from, to, clock.time_zone),
    orders: orderRisks(orders, clock, now),
    at_risk_margin_minutes: clock.at_risk_margin_minutes,
  };
}

// Calendar feeds -------------------------------------------------------------------------------

/** Only a sha-256 of the feed secret is kept, like the sign-in tokens; the secret is shown once. */
export const hashCalendarToken = (token: string) => createHash("sha256").update(token).digest("hex");

export async function calendarTokenStatus(db: Database, userId: string) {
  const row = await db.selectFrom("users").select(["calendar_token", "calendar_token_created_at"]).where("id", "=", userId).executeTakeFirst();
  return { active: !!row?.calendar_token, created_at: row?.calendar_token_created_at?.toISOString() ?? null };
}

/** The active user a feed secret belongs to; the role is checked by the caller on every fetch. */
export async function findCalendarUser(db: Database, token: string) {
  if (!/^[A-Za-z0-9_-]{20,100}$/.test(token)) return undefined;
  return db
    .selectFrom("users")
    .select(["id", "role", "name"])
    .where("calendar_token", "=", hashCalendarToken(token))
    .where("active", "=", true)
    .executeTakeFirst();
}

export async function findResource(db: Database, id: string): Promise<ResourceRef | undefined> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return undefined;
  return (await listResources(db)).find((r) => r.id === id);
}
