import { sql } from "kysely";
import type { Database } from "@/db/client";
import { AppError } from "@/lib/errors";
import { loadShopContext, listFurnaceRuns, cycleMinutesFor, type Db } from "@/db/batches/reads";
import { getShopPlanning, listPrinterSpecs, printerBlockedFrom } from "@/db/floor/reads";
import { currentLayout, packFurnace, packUnit, profileLabel } from "@/lib/batches/rules";
import { staffedHoursFor } from "@/lib/floor/plan";
import { spreadFrom, type PromiseOpenRun, type SpreadKind, type Spread } from "@/lib/quotes/promise";
import type { QuoteContext, QuoteLineSpec, QuoteMaterial, QuoteRates } from "@/lib/quotes/evaluate";

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
  const [shop, printers, blocked, ctx, settings, materials, yields, ratios] = await Promise.all([
    getShopPlanning(db as Database),
    listPrinterSpecs(db as Database, { activeOnly: true }),
    printerBlockedFrom(db as Database, now),
    loadShopContext(db, now),
    getQuoteSettings(db),
    listMaterialRates(db),
    materialOutcomes(db),
    durationRatios(db),
  ]);
  const [washBusy, furnaceBusy, maint, openRuns] = await Promise.all([
    db.selectFrom("wash_batches").select(["wash_station_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running", "complete"]).where("ends_at", ">", now).execute(),
    db.selectFrom("furnace_runs").select(["furnace_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running", "complete"]).where("ends_at", ">", now).execute(),
    db.selectFrom("maintenance_windows").select(["wash_station_id", "furnace_id", "starts_at", "ends_at"]).where("resource", "in", ["wash_station", "furnace"]).where("ends_at", ">", now).execute(),
    listFurnaceRuns(db, ctx, { states: ["scheduled"] }),
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
    // Finishing is not booked, so there is nothing recorded to compare with.
    finishing: spreadFrom([], FALLBACK_P90_RATIO),
  };
  return {
    now: now.getTime(),
    horizon_days: PROMISE_HORIZON_DAYS,
    staffed: staffedHoursFor(shop.staffed_hours, shop.time_zone),
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
    finishing_lead_minutes: ctx.finishing_lead_minutes,
    spread,
    rates: ratesOf(settings),
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
  // quoted total vs the actual hours booked on printers (the only actual cost recorded so far).
  const finished = await sql<{
    code: string; quote_code: string; promise_at: Date; completed_at: Date | null; total_minor: number; currency: string; minor_digits: number;
    units: number; done: number; scrapped: number;
  }>`
    select o.code, q.code as quote_code, q.promise_at, q.total_minor, q.currency, q.minor_digits,
      max(u.state_changed_at) filter (where u.state = 'done') as completed_at,
      count(u.id)::int as units,
      count(u.id) filter (where u.state = 'done')::int as done,
      count(u.id) filter (where u.state = 'scrapped')::int as scrapped
    from quotes q join orders o on o.id = q.order_id join parts p on p.order_id = o.id join units u on u.part_id = p.id
    where q.status = 'accepted'
    group by o.code, q.code, q.promise_at, q.total_minor, q.currency, q.minor_digits
    having bool_and(u.state in ('done', 'scrapped'))
    order by max(u.state_changed_at) desc limit 50`.execute(db);
  const sent = Number(counts.sent);
  const accepted = Number(counts.accepted);
  const decided = accepted + Number(counts.declined) + Number(counts.expired);
  return {
    sent,
    accepted,
    declined: Number(counts.declined),
    expired: Number(counts.expired),
    win_rate: decided ? accepted / decided : null,
    finished: finished.rows.map((r) => ({
      order_code: r.code, quote_code: r.quote_code, promise_at: r.promise_at, completed_at: r.completed_at,
      late_minutes: r.completed_at && r.promise_at ? Math.round((new Date(r.completed_at).getTime() - new Date(r.promise_at).getTime()) / 60_000) : null,
      quoted_total_minor: Number(r.total_minor), currency: r.currency, minor_digits: r.minor_digits,
      units: r.units, done: r.done, scrapped: r.scrapped,
    })),
  };
}
