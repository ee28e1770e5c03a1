import { sql } from "kysely";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { loadShopContext, listFurnaceRuns, type Db } from "@/db/batches/reads";
import { cycleMinutesFor } from "@/lib/batches/board-unit";
import { getShopPlanning, listPrinterSpecs, printerBlockedFrom } from "@/db/floor/reads";
import { currentLayout, packFurnace, packUnit, profileLabel } from "@/lib/batches/rules";
import { staffedHoursFor } from "@/lib/floor/plan";
import { spreadFrom, type PromiseOpenRun, type SpreadKind, type Spread } from "@/lib/quotes/promise";
import type { QuoteContext, QuoteLineSpec, QuoteMaterial, QuoteRates } from "@/lib/quotes/evaluate";
import { finishingMinutesPerUnit, type FurnaceRates } from "@/lib/quotes/cost";
import { finishingQueue, type QueuedUnit } from "@/lib/quotes/finishing-queue";
import { actualCost, quotedDirect, type ActualBuild, type ActualCost, type ActualRun, type ActualShare } from "@/lib/quotes/actual-cost";
import type { StaffedHours } from "@/lib/planning/staffed-hours";

const num = (v: unknown) => Number(v);
const numOrNull = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** How far ahead a promise may be planned; beyond it the quote says it cannot be fitted. */
export const PROMISE_HORIZON_DAYS = 120;
/** Actual ÷ planned when no history is recorded yet: common practice (no published source). */
export const FALLBACK_P90_RATIO = 1.25;

export async function getQuoteSettings(db: Db) {
  const row = await db.selectFrom("quote_settings").selectAll().where("id", "=", 1).executeTakeFirst();
  if (!row) throw new AppError("unavailable", "Quote settings are missing; run the migrations.");
  return {
    ...row,
    wash_batch_volume_cm3: num(row.wash_batch_volume_cm3),
    finishing_min_per_cm2: num(row.finishing_min_per_cm2),
    inspection_min_per_unit: num(row.inspection_min_per_unit),
    fallback_yield: num(row.fallback_yield),
  };
}
export type QuoteSettingsRow = Awaited<ReturnType<typeof getQuoteSettings>>;

export function ratesOf(s: QuoteSettingsRow): QuoteRates {
  return {
    printer_rate_minor_per_h: s.printer_rate_minor_per_h,
    wash_batch_cost_minor: s.wash_batch_cost_minor,
    wash_batch_volume_cm3: s.wash_batch_volume_cm3,
    furnace_run_cost_minor: s.furnace_run_cost_minor,
    furnace_gas_cost_minor: s.furnace_gas_cost_minor,
    furnace_energy_cost_minor: s.furnace_energy_cost_minor,
    finishing_rate_minor_per_h: s.finishing_rate_minor_per_h,
    finishing_min_per_cm2: s.finishing_min_per_cm2,
    inspection_rate_minor_per_h: s.inspection_rate_minor_per_h,
    inspection_min_per_unit: s.inspection_min_per_unit,
    overhead_bp: s.overhead_bp,
    margin_bp: s.margin_bp,
    setup_minor_per_order: s.setup_minor_per_order,
    fallback_yield: s.fallback_yield,
  };
}

/** Active materials with their quoting rates (defaults where none are set yet). */
export async function listMaterialRates(db: Db) {
  const rows = await db
    .selectFrom("materials as m")
    .leftJoin("material_quote_rates as r", "r.material_id", "m.id")
    .leftJoin("sinter_profiles as p", "p.id", "m.default_profile_id")
    .select([
      "m.id", "m.code", "m.name", "m.solids_loading", "m.theoretical_density_g_cm3", "m.binder_density_g_cm3", "m.shrink_xy", "m.shrink_z",
      "m.wash_k_min_per_mm2", "m.wash_min_minutes", "p.code as profile_code", "p.revision as profile_revision",
      "r.feedstock_minor_per_kg", "r.infill_fraction", "r.support_fraction", "r.version as rate_version",
    ])
    .where("m.active", "=", true)
    .orderBy("m.code")
    .execute();
  return rows.map((r) => ({
    id: r.id,
    code: r.code,
    name: r.name,
    solids_loading: num(r.solids_loading),
    theoretical_density_g_cm3: num(r.theoretical_density_g_cm3),
    binder_density_g_cm3: num(r.binder_density_g_cm3),
    shrink_xy: num(r.shrink_xy),
    shrink_z: num(r.shrink_z),
    wash_k_min_per_mm2: num(r.wash_k_min_per_mm2),
    wash_min_minutes: num(r.wash_min_minutes),
    profile_label: r.profile_code ? profileLabel({ code: r.profile_code, revision: r.profile_revision! }) : null,
    feedstock_minor_per_kg: r.feedstock_minor_per_kg ?? 0,
    infill_fraction: numOrNull(r.infill_fraction) ?? 1,
    support_fraction: numOrNull(r.support_fraction) ?? 0.1,
    rates_set: r.rate_version !== null,
  })) satisfies (QuoteMaterial & { rates_set: boolean })[];
}

/** Printers and furnaces with their own quoting rates (null = the shop's rate). */
export async function listEquipmentRates(db: Db) {
  const [printers, furnaces] = await Promise.all([
    db.selectFrom("printers as p").leftJoin("printer_quote_rates as r", "r.printer_id", "p.id")
      .select(["p.id", "p.name", "p.active", "r.rate_minor_per_h", "r.version as rate_version"]).orderBy("p.name").execute(),
    db.selectFrom("furnaces as f").leftJoin("furnace_quote_rates as r", "r.furnace_id", "f.id")
      .select(["f.id", "f.name", "f.active", "r.run_cost_minor", "r.gas_cost_minor", "r.energy_cost_minor", "r.version as rate_version"]).orderBy("f.name").execute(),
  ]);
  const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  return {
    printers: printers.map((p) => ({ id: p.id, name: p.name, active: p.active, rate_minor_per_h: n(p.rate_minor_per_h) })),
    furnaces: furnaces.map((f) => ({ id: f.id, name: f.name, active: f.active, run_cost_minor: n(f.run_cost_minor), gas_cost_minor: n(f.gas_cost_minor), energy_cost_minor: n(f.energy_cost_minor) })),
  };
}

async function equipmentRateMaps(db: Db): Promise<{ printer_rates: Map<string, number>; furnace_rates: Map<string, FurnaceRates> }> {
  const { printers, furnaces } = await listEquipmentRates(db);
  return {
    printer_rates: new Map(printers.flatMap((p) => (p.rate_minor_per_h === null ? [] : [[p.id, p.rate_minor_per_h] as [string, number]]))),
    furnace_rates: new Map(furnaces.map((f) => [f.id, { run_cost_minor: f.run_cost_minor, gas_cost_minor: f.gas_cost_minor, energy_cost_minor: f.energy_cost_minor }])),
  };
}

/** Active machinists and the finishing work released to them or coming from booked furnace runs. */
export async function loadFinishingQueue(db: Db, now: Date, staffed: StaffedHours | null, minPerCm2: number) {
  const [lanes, rows] = await Promise.all([
    db.selectFrom("users").select(sql<number>`count(*)`.as("n")).where("role", "=", "machinist").where("active", "=", true).executeTakeFirstOrThrow(),
    db
      .selectFrom("units as u")
      .innerJoin("parts as p", "p.id", "u.part_id")
      .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id")
      .select([
        "u.state", "r.state as run_state", "r.ends_at as run_ends_at",
        "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm",
        "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm", "p.target_ra_um", "p.tolerance_um",
      ])
      .where((eb) =>
        eb.or([
          eb("u.state", "in", ["sintered", "ready_for_finishing", "finishing"]),
          eb.and([eb("u.state", "in", ["planned", "printing", "green", "washing", "brown", "sintering"]), eb("r.state", "in", ["scheduled", "running"])]),
        ]),
      )
      .execute(),
  ]);
  const units: QueuedUnit[] = rows.map((r) => ({
    released: r.state === "sintered" || r.state === "ready_for_finishing" || r.state === "finishing",
    run_ends_at: r.run_ends_at ? new Date(r.run_ends_at).getTime() : null,
    minutes: finishingMinutesPerUnit(
      { x: num(r.nominal_x_mm), y: num(r.nominal_y_mm), z: num(r.nominal_z_mm) },
      { x_neg: num(r.stock_x_neg_mm), x_pos: num(r.stock_x_pos_mm), y_neg: num(r.stock_y_neg_mm), y_pos: num(r.stock_y_pos_mm), z_neg: num(r.stock_z_neg_mm), z_pos: num(r.stock_z_pos_mm) },
      numOrNull(r.target_ra_um), numOrNull(r.tolerance_um), minPerCm2,
    ),
  }));
  return { lanes: Math.max(1, Number(lanes.n)), queue: finishingQueue(units, now.getTime(), staffed) };
}

/** Units with a verdict per material: done (good) or scrapped at any step. */
export async function materialOutcomes(db: Db): Promise<Map<string, { good: number; scrapped: number }>> {
  const rows = await db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .select([
      "p.material_id",
      sql<number>`count(*) filter (where u.state = 'done')`.as("good"),
      sql<number>`count(*) filter (where u.state = 'scrapped')`.as("scrapped"),
    ])
    .where("u.state", "in", ["done", "scrapped"])
    .groupBy("p.material_id")
    .execute();
  return new Map(rows.map((r) => [r.material_id, { good: Number(r.good), scrapped: Number(r.scrapped) }]));
}

/**
 * Minutes each unit spent in finishing, from its recorded state changes: each stretch from a
 * move into finishing to the next move out of it (done, held, scrapped or sent back); time on
 * hold is not work.
 */
export async function recordedFinishingMinutes(db: Db, unitIds: string[]): Promise<Map<string, number>> {
  const minutes = new Map<string, number>();
  if (!unitIds.length) return minutes;
  const events = await db.selectFrom("events").select(["entity_id", "to_state", "created_at"])
    .where("entity", "=", "unit").where("kind", "=", "state").where("to_state", "in", ["finishing", "done", "on_hold", "scrapped", "ready_for_finishing"]).where("entity_id", "in", unitIds)
    .orderBy("created_at").orderBy("id").execute();
  const startedAt = new Map<string, number>();
  for (const e of events) {
    const t = new Date(e.created_at).getTime();
    if (e.to_state === "finishing") startedAt.set(e.entity_id!, t);
    else if (startedAt.has(e.entity_id!)) {
      minutes.set(e.entity_id!, (minutes.get(e.entity_id!) ?? 0) + (t - startedAt.get(e.entity_id!)!) / 60_000);
      startedAt.delete(e.entity_id!);
    }
  }
  return minutes;
}

/** Recorded ÷ planned finishing minutes of the last 500 finished units whose parts carry finishing work. */
async function finishingRatios(db: Db, minPerCm2: number): Promise<number[]> {
  const done = await db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .select([
      "u.id", "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm",
      "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm", "p.target_ra_um", "p.tolerance_um",
    ])
    .where("u.state", "=", "done")
    .orderBy("u.state_changed_at", "desc")
    .limit(500)
    .execute();
  const recorded = await recordedFinishingMinutes(db, done.map((u) => u.id));
  return done.flatMap((u) => {
    const planned = finishingMinutesPerUnit(
      { x: num(u.nominal_x_mm), y: num(u.nominal_y_mm), z: num(u.nominal_z_mm) },
      { x_neg: num(u.stock_x_neg_mm), x_pos: num(u.stock_x_pos_mm), y_neg: num(u.stock_y_neg_mm), y_pos: num(u.stock_y_pos_mm), z_neg: num(u.stock_z_neg_mm), z_pos: num(u.stock_z_pos_mm) },
      numOrNull(u.target_ra_um), numOrNull(u.tolerance_um), minPerCm2,
    );
    const actual = recorded.get(u.id);
    return planned > 0 && actual !== undefined && actual > 0 ? [actual / planned] : [];
  });
}

/** Actual ÷ planned durations of finished builds, washes and furnace runs (the last 500 of each). */
export async function durationRatios(db: Db): Promise<Record<"print" | "wash" | "furnace", number[]>> {
  const [builds, washes, runs] = await Promise.all([
    sql<{ r: number }>`select extract(epoch from (finished_at - started_at)) / 60 / est_minutes as r from builds
      where state = 'complete' and not failed and finished_at is not null and started_at is not null and est_minutes > 0
      order by finished_at desc limit 500`.execute(db),
    sql<{ r: number }>`select extract(epoch from (finished_at - started_at)) / 60 / est_minutes as r from wash_batches
      where state = 'complete' and finished_at is not null and started_at is not null and est_minutes > 0
      order by finished_at desc limit 500`.execute(db),
    sql<{ r: number }>`select extract(epoch from (unloaded_at - starts_at)) / 60 / cycle_minutes as r from furnace_runs
      where state = 'complete' and unloaded_at is not null and starts_at is not null and cycle_minutes > 0
      order by unloaded_at desc limit 500`.execute(db),
  ]);
  const list = (rows: { r: number }[]) => rows.map((x) => Number(x.r));
  return { print: list(builds.rows), wash: list(washes.rows), furnace: list(runs.rows) };
}

/** Everything a promise plans against: the live schedule, equipment, shop hours, rates, yields. */
export async function loadQuoteContext(db: Db, now = new Date()): Promise<QuoteContext> {
  const [shop, printers, blocked, ctx, settings, materials, yields, ratios, equipmentRates] = await Promise.all([
    getShopPlanning(db as Database),
    listPrinterSpecs(db as Database, { activeOnly: true }),
    printerBlockedFrom(db as Database, now),
    loadShopContext(db, now),
    getQuoteSettings(db),
    listMaterialRates(db),
    materialOutcomes(db),
    durationRatios(db),
    equipmentRateMaps(db),
  ]);
  const staffed = staffedHoursFor(shop.staffed_hours, shop.time_zone);
  const [washBusy, furnaceBusy, maint, openRuns] = await Promise.all([
    db.selectFrom("wash_batches").select(["wash_station_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running", "complete"]).where("ends_at", ">", now).execute(),
    db.selectFrom("furnace_runs").select(["furnace_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running", "complete"]).where("ends_at", ">", now).execute(),
    db.selectFrom("maintenance_windows").select(["wash_station_id", "furnace_id", "starts_at", "ends_at"]).where("resource", "in", ["wash_station", "furnace"]).where("ends_at", ">", now).execute(),
    listFurnaceRuns(db, ctx, { states: ["scheduled"] }),
  ]);
  const [finishing, finishingRatioList] = await Promise.all([
    loadFinishingQueue(db, now, staffed, settings.finishing_min_per_cm2),
    finishingRatios(db, settings.finishing_min_per_cm2),
  ]);
  const intervals = (rows: { id: string | null; starts_at: Date | null; ends_at: Date | null }[], id: string): [number, number][] =>
    rows.filter((r) => r.id === id && r.starts_at && r.ends_at).map((r) => [new Date(r.starts_at!).getTime(), new Date(r.ends_at!).getTime()]);
  const washRows = [...washBusy.map((w) => ({ id: w.wash_station_id, starts_at: w.starts_at, ends_at: w.ends_at })), ...maint.map((m) => ({ id: m.wash_station_id, starts_at: m.starts_at, ends_at: m.ends_at }))];
  const furnaceRows = [...furnaceBusy.map((f) => ({ id: f.furnace_id, starts_at: f.starts_at, ends_at: f.ends_at })), ...maint.map((m) => ({ id: m.furnace_id, starts_at: m.starts_at, ends_at: m.ends_at }))];
  const materialMap = new Map(materials.map((m) => [m.id, m]));
  const profileByLabel = new Map(ctx.profiles.map((p) => [profileLabel(p), p]));

  const furnaces = ctx.furnaces.map((f) => {
    const spec = packFurnace(f, ctx.profiles);
    return { f, spec, busy: intervals(furnaceRows, f.id) };
  });
  const open_runs: PromiseOpenRun[] = [];
  for (const run of openRuns) {
    const fu = furnaces.find((x) => x.f.id === run.furnace_id);
    const profile = ctx.profiles.find((p) => p.id === run.profile_id);
    if (!fu || !profile || !run.starts_at || !run.ends_at) continue;
    const layout = currentLayout(run.tray_layout, run.units, fu.f, profile, ctx.profiles, ctx.clearance_mm);
    if (!layout.ok) continue;
    open_runs.push({
      id: run.id, code: run.code, furnace_id: fu.spec.id, profile_id: profileLabel(profile),
      starts_at: Date.parse(run.starts_at), ends_at: Date.parse(run.ends_at), layout: layout.layout,
      units: run.units.map((u) => packUnit(u, profile, ctx.profiles)),
    });
  }
  const spread: Record<SpreadKind, Spread> = {
    print: spreadFrom(ratios.print, FALLBACK_P90_RATIO),
    wash: spreadFrom(ratios.wash, FALLBACK_P90_RATIO),
    furnace: spreadFrom(ratios.furnace, FALLBACK_P90_RATIO),
    // Finishing has no booking to compare with: its plan is the quote's own minutes per unit.
    finishing: spreadFrom(finishingRatioList, FALLBACK_P90_RATIO),
  };
  return {
    now: now.getTime(),
    horizon_days: PROMISE_HORIZON_DAYS,
    staffed,
    printers: printers.map((p) => ({ ...p, busy: blocked.get(p.id) ?? [] })),
    plate_clearance_mm: shop.plate_clearance_mm,
    wash_stations: ctx.stations.map((s) => ({ id: s.id, name: s.name, capacity_units: s.capacity_units, basket_mm: [s.basket_x_mm, s.basket_y_mm, s.basket_z_mm], busy: intervals(washRows, s.id) })),
    drying_minutes: ctx.drying_minutes,
    furnaces: furnaces.map(({ f, spec, busy }) => ({
      spec,
      name: f.name,
      busy,
      cycles: Object.fromEntries(spec.profiles.map((label) => {
        const p = profileByLabel.get(label);
        return [label, p ? cycleMinutesFor(p, f) : null];
      })),
    })),
    open_runs,
    tray_clearance_mm: ctx.clearance_mm,
    finishing_lanes: finishing.lanes,
    finishing_queue: finishing.queue,
    spread,
    rates: ratesOf(settings),
    ...equipmentRates,
    materials: materialMap,
    yields,
  };
}

// Quotes ----------------------------------------------------------------------------------------

const QUOTE_COLUMNS = [
  "q.id", "q.code", "q.customer", "q.contact_email", "q.status", "q.valid_until", "q.currency", "q.minor_digits", "q.notes", "q.total_minor",
  "q.cost", "q.promise_at", "q.promise_p90_at", "q.promise", "q.sent_at", "q.decided_at", "q.order_id", "q.plan_proposal_id", "q.created_at", "q.updated_at", "q.version",
] as const;

export async function listQuotes(db: Db) {
  return db
    .selectFrom("quotes as q")
    .leftJoin("orders as o", "o.id", "q.order_id")
    .select([...QUOTE_COLUMNS, "o.code as order_code", sql<number>`(select count(*) from quote_lines l where l.quote_id = q.id)`.as("line_count")])
    .orderBy("q.created_at", "desc")
    .limit(500)
    .execute();
}

export async function getQuoteOrThrow(db: Db, id: string) {
  const quote = await db
    .selectFrom("quotes as q")
    .leftJoin("orders as o", "o.id", "q.order_id")
    .select([...QUOTE_COLUMNS, "o.code as order_code"])
    .where("q.id", "=", id)
    .executeTakeFirst();
  if (!quote) throw new AppError("not_found", "That quote does not exist.");
  const lines = await db
    .selectFrom("quote_lines as l")
    .innerJoin("materials as m", "m.id", "l.material_id")
    .leftJoin("files as f", "f.id", "l.file_id")
    .leftJoin("parts as p", "p.id", "l.part_id")
    .selectAll("l")
    .select(["m.code as material_code", "m.name as material_name", "f.filename", "p.part_number"])
    .where("l.quote_id", "=", id)
    .orderBy("l.position")
    .execute();
  return { quote, lines };
}
export type QuoteDetail = Awaited<ReturnType<typeof getQuoteOrThrow>>;

export function lineSpecOf(l: QuoteDetail["lines"][number]): QuoteLineSpec {
  return {
    id: l.id,
    name: l.name,
    material_id: l.material_id,
    quantity: l.quantity,
    nominal: { x: num(l.nominal_x_mm), y: num(l.nominal_y_mm), z: num(l.nominal_z_mm) },
    volume_mm3: numOrNull(l.volume_mm3),
    thickest_wall_mm: num(l.thickest_wall_mm),
    stock: {
      x_neg: num(l.stock_x_neg_mm), x_pos: num(l.stock_x_pos_mm), y_neg: num(l.stock_y_neg_mm),
      y_pos: num(l.stock_y_pos_mm), z_neg: num(l.stock_z_neg_mm), z_pos: num(l.stock_z_pos_mm),
    },
    target_ra_um: numOrNull(l.target_ra_um),
    tolerance_um: numOrNull(l.tolerance_um),
    requested_at: l.requested_at ? new Date(l.requested_at).toISOString() : null,
  };
}

/**
 * What finished orders really cost (lib/quotes/actual-cost.ts): their bookings, draws, finishing
 * times and inspections, shared among orders by units, priced with today's rates.
 */
export async function actualCostsOf(db: Db, orderIds: string[], quoted: Map<string, { feedstock_minor_per_unit: number; setup_minor: number }>): Promise<Map<string, ActualCost>> {
  const out = new Map<string, ActualCost>();
  if (!orderIds.length) return out;
  const units = await db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .select(["u.id", "u.state", "u.build_id", "u.wash_batch_id", "u.furnace_run_id", "p.order_id"])
    .where("p.order_id", "in", orderIds)
    .execute();
  const ids = (k: "build_id" | "wash_batch_id" | "furnace_run_id") => [...new Set(units.flatMap((u) => (u[k] ? [u[k]!] : [])))];
  const buildIds = ids("build_id");
  const washIds = ids("wash_batch_id");
  const runIds = ids("furnace_run_id");
  const unitIds = units.map((u) => u.id);
  const [settings, equipment, materials, builds, washes, runs, finishingMin, inspections] = await Promise.all([
    getQuoteSettings(db),
    listEquipmentRates(db),
    listMaterialRates(db),
    buildIds.length
      ? db.selectFrom("builds as b").innerJoin("printers as pr", "pr.id", "b.printer_id")
          .select(["b.id", "b.code", "b.printer_id", "pr.name as printer_name", "b.material_id", "b.started_at", "b.finished_at", "b.est_minutes",
            sql<number>`(select count(*) from units x where x.build_id = b.id)`.as("units_total"),
            sql<string | null>`(select sum(d.drawn_g) from feedstock_draws d where d.build_id = b.id)`.as("drawn_g")])
          .where("b.id", "in", buildIds).execute()
      : [],
    washIds.length
      ? db.selectFrom("wash_batches as w").select(["w.id", "w.code", sql<number>`(select count(*) from units x where x.wash_batch_id = w.id)`.as("units_total")]).where("w.id", "in", washIds).execute()
      : [],
    runIds.length
      ? db.selectFrom("furnace_runs as r").innerJoin("furnaces as f", "f.id", "r.furnace_id")
          .select(["r.id", "r.code", "r.furnace_id", "f.name as furnace_name", sql<number>`(select count(*) from units x where x.furnace_run_id = r.id)`.as("units_total")])
          .where("r.id", "in", runIds).execute()
      : [],
    recordedFinishingMinutes(db, unitIds),
    db.selectFrom("inspections").select(["unit_id", sql<number>`count(*)`.as("n")]).where("unit_id", "in", unitIds).groupBy("unit_id").execute(),
  ]);
  const rates = ratesOf(settings);
  const printerRate = new Map(equipment.printers.map((p) => [p.id, p.rate_minor_per_h]));
  const furnaceRate = new Map(equipment.furnaces.map((f) => [f.id, f]));
  const price = new Map(materials.map((m) => [m.id, m.feedstock_minor_per_kg]));
  const inspected = new Map(inspections.map((i) => [i.unit_id, Number(i.n)]));
  for (const orderId of orderIds) {
    const mine = units.filter((u) => u.order_id === orderId);
    const count = (k: "build_id" | "wash_batch_id" | "furnace_run_id", id: string) => mine.filter((u) => u[k] === id).length;
    const aBuilds: ActualBuild[] = builds.filter((b) => count("build_id", b.id) > 0).map((b) => {
      const recorded = !!(b.started_at && b.finished_at);
      return {
        code: b.code,
        printer: { name: b.printer_name, rate_minor_per_h: printerRate.get(b.printer_id!) ?? null },
        minutes: recorded ? (new Date(b.finished_at!).getTime() - new Date(b.started_at!).getTime()) / 60_000 : Number(b.est_minutes ?? 0),
        recorded,
        units: count("build_id", b.id),
        units_total: Number(b.units_total),
        drawn_g: b.drawn_g === null ? null : Number(b.drawn_g),
        feedstock_minor_per_kg: price.get(b.material_id) ?? 0,
      };
    });
    const aWashes: ActualShare[] = washes.filter((w) => count("wash_batch_id", w.id) > 0).map((w) => ({ code: w.code, units: count("wash_batch_id", w.id), units_total: Number(w.units_total) }));
    const aRuns: ActualRun[] = runs.filter((r) => count("furnace_run_id", r.id) > 0).map((r) => {
      const own = furnaceRate.get(r.furnace_id!);
      return {
        code: r.code, units: count("furnace_run_id", r.id), units_total: Number(r.units_total),
        furnace: { name: r.furnace_name, run_cost_minor: own?.run_cost_minor ?? null, gas_cost_minor: own?.gas_cost_minor ?? null, energy_cost_minor: own?.energy_cost_minor ?? null },
      };
    });
    const q = quoted.get(orderId) ?? { feedstock_minor_per_unit: 0, setup_minor: 0 };
    out.set(orderId, actualCost({
      builds: aBuilds, washes: aWashes, runs: aRuns,
      finishing_minutes: mine.reduce((s, u) => s + (finishingMin.get(u.id) ?? 0), 0),
      inspections: mine.reduce((s, u) => s + (inspected.get(u.id) ?? 0), 0),
      setup_minor: q.setup_minor,
      quoted_feedstock_minor_per_unit: q.feedstock_minor_per_unit,
    }, rates));
  }
  return out;
}

/** What quoting has taught: quotes sent, won, and for finished orders quoted vs actual. */
export async function quoteLearning(db: Db) {
  const counts = await db
    .selectFrom("quotes")
    .select([
      sql<number>`count(*) filter (where sent_at is not null)`.as("sent"),
      sql<number>`count(*) filter (where status = 'accepted')`.as("accepted"),
      sql<number>`count(*) filter (where status = 'declined')`.as("declined"),
      sql<number>`count(*) filter (where status = 'expired')`.as("expired"),
    ])
    .executeTakeFirstOrThrow();
  // Finished orders that came from a quote: promised vs the last unit's completion, and the
  // quoted direct cost vs the cost recorded on the floor.
  const finished = await sql<{
    order_id: string; code: string; quote_code: string; promise_at: Date; completed_at: Date | null; total_minor: number; currency: string; minor_digits: number;
    cost: unknown; units: number; done: number; scrapped: number;
  }>`
    select o.id as order_id, o.code, q.code as quote_code, q.promise_at, q.total_minor, q.currency, q.minor_digits, q.cost,
      max(u.state_changed_at) filter (where u.state = 'done') as completed_at,
      count(u.id)::int as units,
      count(u.id) filter (where u.state = 'done')::int as done,
      count(u.id) filter (where u.state = 'scrapped')::int as scrapped
    from quotes q join orders o on o.id = q.order_id join parts p on p.order_id = o.id join units u on u.part_id = p.id
    where q.status = 'accepted'
    group by o.id, o.code, q.code, q.promise_at, q.total_minor, q.currency, q.minor_digits, q.cost
    having bool_and(u.state in ('done', 'scrapped'))
    order by max(u.state_changed_at) desc limit 50`.execute(db);
  const quoted = new Map(finished.rows.map((r) => [r.order_id, quotedDirect(r.cost)]));
  const actual = await actualCostsOf(db, finished.rows.map((r) => r.order_id), new Map([...quoted].flatMap(([k, v]) => (v ? [[k, v] as const] : []))));
  const sent = Number(counts.sent);
  const accepted = Number(counts.accepted);
  const decided = accepted + Number(counts.declined) + Number(counts.expired);
  return {
    sent,
    accepted,
    declined: Number(counts.declined),
    expired: Number(counts.expired),
    win_rate: decided ? accepted / decided : null,
    finished: finished.rows.map((r) => {
      const a = actual.get(r.order_id) ?? null;
      const qd = quoted.get(r.order_id)?.direct_minor ?? null;
      return {
        order_code: r.code, quote_code: r.quote_code, promise_at: r.promise_at, completed_at: r.completed_at,
        late_minutes: r.completed_at && r.promise_at ? Math.round((new Date(r.completed_at).getTime() - new Date(r.promise_at).getTime()) / 60_000) : null,
        quoted_total_minor: Number(r.total_minor), currency: r.currency, minor_digits: r.minor_digits,
        quoted_direct_minor: qd,
        actual_direct_minor: a?.total_minor ?? null,
        actual_figures: a?.figures ?? [],
        units: r.units, done: r.done, scrapped: r.scrapped,
      };
    }),
  };
}
