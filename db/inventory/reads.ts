import { sql } from "kysely";
import type { Database } from "@/db/client";
import { greenVolumeOf } from "@/db/floor/reads";
import { AppError } from "@/lib/errors";
import { estimateDrawOfTotal, type DrawEstimate } from "@/lib/inventory/consumption";
import { drawRefusal, type LotState } from "@/lib/inventory/lots";
import { projectOnHand, type ProjectionBuild, type ProjectionLot } from "@/lib/inventory/projection";
import { isUuid } from "@/lib/ids";
import { formatLocalDate, localDateOf } from "@/lib/process/time-zone";
import type { LotRow, MaterialProjection, MaterialStock } from "@/lib/inventory/types";
export type { LotRow, MaterialProjection, MaterialStock };
import { bathState, gasShortfalls, runGasLitres, type BathState, type GasWarning } from "@/lib/inventory/consumables";

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));

/** Today in the shop's time zone, as YYYY-MM-DD (the day a lot expires or a build draws). */
export function shopDay(at: Date, timeZone: string): string {
  return formatLocalDate(localDateOf(at.getTime(), timeZone));
}

export async function findShopZone(db: Database): Promise<string> {
  const row = await db.selectFrom("shop_settings").select("time_zone").where("id", "=", 1).executeTakeFirst();
  return row?.time_zone ?? "UTC";
}


const lotColumns = [
  "l.id", "l.code", "l.material_id", "m.code as material_code", "m.name as material_name", "l.supplier", "l.supplier_lot", "f.name as form", "l.form_id",
  sql<string>`to_char(l.received_on, 'YYYY-MM-DD')`.as("received_on"), sql<string | null>`to_char(l.expires_on, 'YYYY-MM-DD')`.as("expires_on"),
  "l.quantity_g", "l.remaining_g", "l.storage_notes", "l.certificate_file_id", "l.state", "l.state_reason", "l.recalled_at", "l.recall_reason", "l.version",
] as const;

function lotRow(r: Record<string, unknown>): LotRow {
  return { ...(r as LotRow), quantity_g: Number(r.quantity_g), remaining_g: Number(r.remaining_g), builds: Number(r.builds ?? 0) };
}

export async function listLots(db: Database, q: { material_id?: string; state?: string; q?: string } = {}): Promise<LotRow[]> {
  let query = db
    .selectFrom("feedstock_lots as l")
    .innerJoin("materials as m", "m.id", "l.material_id")
    .leftJoin("feedstock_forms as f", "f.id", "l.form_id")
    .select([...lotColumns, sql<number>`(select count(*) from feedstock_draws d where d.lot_id = l.id)`.as("builds")]);
  if (q.material_id) query = query.where("l.material_id", "=", q.material_id);
  if (q.state) query = query.where("l.state", "=", q.state as LotState);
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    query = query.where((eb) => eb.or([eb("l.code", "ilike", like), eb("l.supplier", "ilike", like), eb("l.supplier_lot", "ilike", like)]));
  }
  const rows = await query.orderBy("l.received_on", "desc").orderBy("l.code", "desc").limit(1000).execute();
  return rows.map(lotRow);
}

export async function getLotOrThrow(db: Database, id: string): Promise<LotRow> {
  if (!isUuid(id)) throw new AppError("not_found", "That feedstock lot does not exist.");
  const row = await db
    .selectFrom("feedstock_lots as l")
    .innerJoin("materials as m", "m.id", "l.material_id")
    .leftJoin("feedstock_forms as f", "f.id", "l.form_id")
    .select([...lotColumns, sql<number>`(select count(*) from feedstock_draws d where d.lot_id = l.id)`.as("builds")])
    .where("l.id", "=", id)
    .executeTakeFirst();
  if (!row) throw new AppError("not_found", "That feedstock lot does not exist.");
  return lotRow(row);
}

/** A lot's certificate of analysis: the stored file's name, type, size and place, or undefined. */
export async function findLotCertificate(db: Database, lotId: string) {
  if (!isUuid(lotId)) return undefined;
  return db
    .selectFrom("feedstock_lots as l")
    .innerJoin("files as f", "f.id", "l.certificate_file_id")
    .select(["f.id", "f.bucket", "f.object_key", "f.filename", "f.content_type", "f.size_bytes", "f.sha256", "f.created_at"])
    .where("l.id", "=", lotId)
    .executeTakeFirst();
}

export async function findLotByCode(db: Database, code: string): Promise<{ id: string } | undefined> {
  return db.selectFrom("feedstock_lots").select("id").where(sql`lower(code)`, "=", code.trim().toLowerCase()).executeTakeFirst();
}

export async function listForms(db: Database) {
  return db.selectFrom("feedstock_forms").select(["id", "name"]).orderBy("name").execute();
}


export async function listMaterialStock(db: Database): Promise<MaterialStock[]> {
  const rows = await db
    .selectFrom("materials")
    .select(["id", "code", "name", "version", "support_allowance", "purge_g", "reorder_point_g", "lead_time_days", "green_density_g_cm3", "reorder_alerted_at"])
    .where("active", "=", true)
    .orderBy("code")
    .execute();
  return rows.map((r) => ({
    id: r.id, code: r.code, name: r.name, version: r.version, support_allowance: Number(r.support_allowance), purge_g: Number(r.purge_g),
    reorder_point_g: Number(r.reorder_point_g), lead_time_days: r.lead_time_days, feedstock_density_g_cm3: Number(r.green_density_g_cm3), reorder_alerted_at: r.reorder_alerted_at,
  }));
}

type BuildDraw = DrawEstimate & { material_id: string; code: string; starts_at_ms: number | null; units: number };

/**
 * What each build will draw, from its units' printed volume, the material's feedstock density
 * and its allowances. Two passes over the builds' units, so that a busy schedule moves one narrow
 * row per build rather than one per unit: first the distinct parts printed in each material,
 * whose green volume is worked out here once each (greenVolumeOf, the floor's rule); then, in the
 * database, each build's units counted and their volumes summed, grouped on the units' build id
 * alone before the builds are met (one hash of narrow rows rather than of whole build rows), and
 * the start sent as epoch milliseconds. The density and allowances are read once per material
 * and applied here (estimateDrawOfTotal), so the rule has one copy, in lib/.
 */
async function loadBuildDraws(db: Database, filter: { buildIds?: string[]; scheduledOnly?: boolean }): Promise<Map<string, BuildDraw>> {
  const out = new Map<string, BuildDraw>();
  if (filter.buildIds && !filter.buildIds.length) return out;
  const scope = sql.join(
    [
      ...(filter.buildIds ? [sql`b.id = any(${filter.buildIds}::uuid[])`] : []),
      ...(filter.scheduledOnly ? [sql`b.state = 'scheduled' and b.starts_at is not null`] : []),
      sql`true`,
    ],
    sql` and `,
  );
  const [{ rows: printed }, materials] = await Promise.all([
    sql<{
      part_id: string; material_id: string; volume_mm3: unknown; nominal_x_mm: unknown; nominal_y_mm: unknown; nominal_z_mm: unknown; green_x_mm: unknown; green_y_mm: unknown; green_z_mm: unknown;
      stock_x_neg_mm: unknown; stock_x_pos_mm: unknown; stock_y_neg_mm: unknown; stock_y_pos_mm: unknown; stock_z_neg_mm: unknown; stock_z_pos_mm: unknown; shrink_xy: unknown; shrink_z: unknown;
    }>`
    select p.id as part_id, m.id as material_id, p.volume_mm3, p.nominal_x_mm, p.nominal_y_mm, p.nominal_z_mm, p.green_x_mm, p.green_y_mm, p.green_z_mm,
      p.stock_x_neg_mm, p.stock_x_pos_mm, p.stock_y_neg_mm, p.stock_y_pos_mm, p.stock_z_neg_mm, p.stock_z_pos_mm, m.shrink_xy, m.shrink_z
    from parts p
    cross join materials m
    where (p.id, m.id) in (select distinct u.part_id, b.material_id from units u join builds b on b.id = u.build_id where u.state <> 'scrapped' and ${scope})`.execute(db),
    db.selectFrom("materials").select(["id", "green_density_g_cm3", "support_allowance", "purge_g"]).execute(),
  ]);
  const volumes = printed.map((p) => greenVolumeOf(p));
  const { rows } = await sql<{ id: string; code: string; material_id: string; starts_at_ms: number | null; units: number | null; volume_mm3: number | null }>`
    select b.id, b.code, b.material_id, (extract(epoch from b.starts_at) * 1000)::float8 as starts_at_ms, x.units, x.volume_mm3
    from builds b
    left join (
      select u.build_id, count(*)::int as units, sum(v.volume_mm3)::float8 as volume_mm3
      from units u
      join builds b on b.id = u.build_id
      join unnest(${printed.map((p) => p.part_id)}::uuid[], ${printed.map((p) => p.material_id)}::uuid[], ${volumes}::float8[]) as v(part_id, material_id, volume_mm3)
        on v.part_id = u.part_id and v.material_id = b.material_id
      where u.state <> 'scrapped' and ${scope}
      group by u.build_id
    ) x on x.build_id = b.id
    where ${scope}`.execute(db);
  const allowances = new Map(materials.map((m) => [m.id, { feedstock_density_g_cm3: Number(m.green_density_g_cm3), support_allowance: Number(m.support_allowance), purge_g: Number(m.purge_g) }]));
  for (const r of rows) {
    const units = r.units ?? 0;
    const e = estimateDrawOfTotal(r.volume_mm3 ?? 0, units, allowances.get(r.material_id)!);
    // fields named one by one: a spread per build cost more than the rest of this loop
    out.set(r.id, { parts_g: e.parts_g, supports_g: e.supports_g, purge_g: e.purge_g, total_g: e.total_g, material_id: r.material_id, code: r.code, starts_at_ms: r.starts_at_ms, units });
  }
  return out;
}

/** What each build will draw (a build without units is left out). */
export async function estimateBuildDraws(db: Database, filter: { buildIds?: string[]; scheduledOnly?: boolean }): Promise<Map<string, DrawEstimate & { material_id: string }>> {
  const out = new Map<string, DrawEstimate & { material_id: string }>();
  for (const [id, d] of await loadBuildDraws(db, filter)) {
    if (d.units > 0) out.set(id, { parts_g: d.parts_g, supports_g: d.supports_g, purge_g: d.purge_g, total_g: d.total_g, material_id: d.material_id });
  }
  return out;
}

type StockLot = ProjectionLot & { state: LotState };
type MaterialInputs = MaterialStock & { tracked: boolean; lots: StockLot[]; builds: ProjectionBuild[] };

/**
 * What every projection of stock starts from, in one place: per material, its lots on the shelf
 * (released and in date counts as usable) and the builds that will draw from it on their shop
 * day — the scheduled ones, and, for a planning proposal, the proposed ones at their proposed
 * start in place of where they are booked now. A material no lot was ever received for is not
 * tracked (its builds start as before).
 */
async function loadStockInputs(db: Database, now: Date, proposed: Array<{ build_id: string; code: string; starts_at: string }> = []): Promise<{ today: string; zone: string; materials: MaterialInputs[] }> {
  const zone = await findShopZone(db);
  const today = shopDay(now, zone);
  const proposedIds = proposed.map((p) => p.build_id);
  const [materials, lots, scheduled, proposedDraws, tracked] = await Promise.all([
    listMaterialStock(db),
    db
      .selectFrom("feedstock_lots")
      .select(["material_id", "state", "remaining_g", sql<string | null>`to_char(expires_on, 'YYYY-MM-DD')`.as("expires_on")])
      .where("state", "in", ["released", "quarantine"])
      .where("remaining_g", ">", 0)
      .execute(),
    loadBuildDraws(db, { scheduledOnly: true }),
    estimateBuildDraws(db, { buildIds: proposedIds }),
    db.selectFrom("feedstock_lots").select("material_id").distinct().execute(),
  ]);
  const trackedIds = new Set(tracked.map((r) => r.material_id));
  // Every offset from UTC in use since 1972 is a whole number of quarter hours (from memory of
  // the IANA tz database: Liberia's −0:44:30 was the last odd one), so two starts in the same
  // UTC quarter hour fall on the same shop day and the zone is asked once per quarter hour.
  const days = new Map<number, string>();
  const dayOf = (at: number | string) => {
    const bucket = Math.floor((typeof at === "number" ? at : Date.parse(at)) / 900_000);
    let day = days.get(bucket);
    if (day === undefined) days.set(bucket, (day = shopDay(new Date(bucket * 900_000), zone)));
    return day;
  };
  const skip = new Set(proposedIds);
  const byMaterial = new Map<string, MaterialInputs>(materials.map((m) => [m.id, { ...m, tracked: trackedIds.has(m.id), lots: [], builds: [] }]));
  for (const l of lots) {
    byMaterial.get(l.material_id)?.lots.push({
      state: l.state, remaining_g: Number(l.remaining_g), expires_on: l.expires_on, usable: l.state === "released" && !(l.expires_on && l.expires_on < today),
    });
  }
  // In order of start: within a day, the build that starts first takes what the shelf holds first.
  const drawing: Array<{ at: number; material_id: string; build: ProjectionBuild }> = [];
  for (const [id, b] of scheduled) {
    if (!skip.has(id)) drawing.push({ at: b.starts_at_ms!, material_id: b.material_id, build: { id, code: b.code, day: dayOf(b.starts_at_ms!), grams: b.total_g } });
  }
  for (const p of proposed) {
    const draw = proposedDraws.get(p.build_id);
    if (draw) drawing.push({ at: Date.parse(p.starts_at), material_id: draw.material_id, build: { id: p.build_id, code: p.code, day: dayOf(p.starts_at), grams: draw.total_g } });
  }
  drawing.sort((a, b) => a.at - b.at || (a.build.code < b.build.code ? -1 : a.build.code > b.build.code ? 1 : 0));
  for (const d of drawing) byMaterial.get(d.material_id)?.builds.push(d.build);
  return { today, zone, materials: [...byMaterial.values()] };
}

/** On hand, committed and projected per material over `days`, from the live schedule. */
export async function projectStock(db: Database, opts: { days: number; now?: Date; materialId?: string }): Promise<{ today: string; time_zone: string; materials: MaterialProjection[] }> {
  const { today, zone, materials } = await loadStockInputs(db, opts.now ?? new Date());
  const out: MaterialProjection[] = [];
  for (const { lots, builds, ...m } of materials) {
    if (opts.materialId && m.id !== opts.materialId) continue;
    const projection = projectOnHand({ today, horizon_days: opts.days, reorder_point_g: m.reorder_point_g, lots, builds });
    const quarantine = lots.filter((l) => l.state === "quarantine").reduce((s, l) => s + l.remaining_g, 0);
    out.push({ ...m, quarantine_g: Math.round(quarantine * 10) / 10, projection });
  }
  return { today, time_zone: zone, materials: out };
}

/** Scheduled builds whose feedstock will not be on the shelf when they start, with the reason. */
export async function listShortBuilds(db: Database, days = 90): Promise<Array<{ build_id: string; material_code: string; first_short_day: string }>> {
  const { materials } = await projectStock(db, { days });
  return materials.filter((m) => m.tracked).flatMap((m) => m.projection.short_builds.map((id) => ({ build_id: id, material_code: m.code, first_short_day: m.projection.first_short_day! })));
}

export type GenealogyRow = {
  unit_id: string; serial: string; state: string; build_id: string; build_code: string; printer: string | null; drawn_g: number;
  wash_batch_code: string | null; furnace_run_code: string | null; profile_code: string | null; inspections: number; passed: boolean | null;
  part_number: string; order_id: string; order_code: string; customer: string;
};

/**
 * Every unit a lot reached, with its path through the shop, in one query. The lot's units are
 * gathered first (a materialized CTE: the lot's draws → their builds → units, by index) and only
 * those meet the lookups, so the planner orders two small joins rather than ten; the lot's
 * inspections are counted in one grouped pass (by the unit_id index) instead of two correlated
 * subqueries per unit; and the order is by byte value ("C" collation: codes and serials are
 * machine-made, and a linguistic sort of 5,000 keys costs more than the rest of the query).
 */
export async function lotGenealogy(db: Database, lotId: string): Promise<GenealogyRow[]> {
  if (!isUuid(lotId)) return [];
  const rows = await db
    .with(
      (wb) => wb("lu").materialized(),
      (qb) =>
        qb
          .selectFrom("feedstock_draws as d")
          .innerJoin("builds as b", "b.id", "d.build_id")
          .innerJoin("units as u", "u.build_id", "b.id")
          .select([
            "u.id as unit_id", "u.serial", "u.state", "u.part_id", "u.wash_batch_id", "u.furnace_run_id",
            "b.id as build_id", "b.code as build_code", "b.printer_id", "d.drawn_g",
          ])
          .where("d.lot_id", "=", lotId),
    )
    .with("ins", (qb) =>
      qb
        .selectFrom("inspections as i")
        .select(["i.unit_id", sql<number>`count(*)::int`.as("n"), sql<boolean | null>`(array_agg(i.passed order by i.created_at desc))[1]`.as("passed")])
        .where("i.unit_id", "in", (eb) => eb.selectFrom("lu").select("lu.unit_id"))
        .groupBy("i.unit_id"),
    )
    .selectFrom("lu")
    .innerJoin("parts as p", "p.id", "lu.part_id")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .leftJoin("printers as pr", "pr.id", "lu.printer_id")
    .leftJoin("wash_batches as w", "w.id", "lu.wash_batch_id")
    .leftJoin("furnace_runs as r", "r.id", "lu.furnace_run_id")
    .leftJoin("sinter_profiles as sp", "sp.id", "r.profile_id")
    .leftJoin("ins", "ins.unit_id", "lu.unit_id")
    .select([
      "lu.unit_id", "lu.serial", "lu.state", "lu.build_id", "lu.build_code", "pr.name as printer", "lu.drawn_g",
      "w.code as wash_batch_code", "r.code as furnace_run_code", "sp.code as profile_code", "p.part_number", "o.id as order_id", "o.code as order_code", "o.customer",
      "ins.n as inspections", "ins.passed",
    ])
    .orderBy(sql`lu.build_code collate "C"`)
    .orderBy(sql`lu.serial collate "C"`)
    .execute();
  return rows.map((r) => ({ ...r, drawn_g: Number(r.drawn_g), inspections: Number(r.inspections ?? 0) }));
}

/** From a unit back to its lots, printer, wash, run and profile. */
export async function unitOrigin(db: Database, unitId: string) {
  if (!isUuid(unitId)) throw new AppError("not_found", "Unit not found.");
  const unit = await db
    .selectFrom("units as u")
    .leftJoin("builds as b", "b.id", "u.build_id")
    .leftJoin("printers as pr", "pr.id", "b.printer_id")
    .leftJoin("wash_batches as w", "w.id", "u.wash_batch_id")
    .leftJoin("wash_stations as ws", "ws.id", "w.wash_station_id")
    .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id")
    .leftJoin("furnaces as f", "f.id", "r.furnace_id")
    .leftJoin("sinter_profiles as sp", "sp.id", "r.profile_id")
    .select([
      "u.id", "u.serial", "u.state", "b.id as build_id", "b.code as build_code", "b.material_lot", "pr.name as printer", "w.code as wash_batch_code", "ws.name as wash_station",
      "r.code as furnace_run_code", "f.name as furnace", "sp.code as profile_code", "sp.name as profile_name",
    ])
    .where("u.id", "=", unitId)
    .executeTakeFirst();
  if (!unit) throw new AppError("not_found", "Unit not found.");
  const lots = unit.build_id
    ? await db
        .selectFrom("feedstock_draws as d")
        .innerJoin("feedstock_lots as l", "l.id", "d.lot_id")
        .select(["l.id", "l.code", "l.supplier", "l.supplier_lot", "l.state", "d.drawn_g"])
        .where("d.build_id", "=", unit.build_id)
        .orderBy("l.code")
        .execute()
    : [];
  return { ...unit, lots: lots.map((l) => ({ ...l, drawn_g: Number(l.drawn_g) })) };
}

export async function listDrawsForBuild(db: Database, buildId: string) {
  const rows = await db
    .selectFrom("feedstock_draws as d")
    .innerJoin("feedstock_lots as l", "l.id", "d.lot_id")
    .select(["d.id", "d.lot_id", "l.code as lot_code", "d.estimated_g", "d.drawn_g", "d.corrected_at", "d.correction_note"])
    .where("d.build_id", "=", buildId)
    .orderBy("l.code")
    .execute();
  return rows.map((r) => ({ ...r, estimated_g: Number(r.estimated_g), drawn_g: Number(r.drawn_g) }));
}

export type StationBath = { id: string; name: string; solvent: string; version: number; bath_changed_at: Date; bath_alerted_at: Date | null } & BathState;

/** Binder each bath has taken up since its last change, from the weighed units washed in it. */
export async function listBaths(db: Database): Promise<StationBath[]> {
  const stations = await db
    .selectFrom("wash_stations")
    .select(["id", "name", "solvent", "version", "bath_binder_limit_g", "bath_changed_at", "bath_alerted_at"])
    .where("active", "=", true)
    .orderBy("name")
    .execute();
  const units = await db
    .selectFrom("units as u")
    .innerJoin("wash_batches as w", "w.id", "u.wash_batch_id")
    .innerJoin("wash_stations as s", "s.id", "w.wash_station_id")
    .select(["s.id as station_id", "u.green_mass_g", "u.brown_mass_g"])
    .where("w.state", "in", ["running", "complete"])
    .where(sql<boolean>`coalesce(w.started_at, w.starts_at) >= s.bath_changed_at`)
    .execute();
  return stations.map((s) => ({
    id: s.id, name: s.name, solvent: s.solvent, version: s.version, bath_changed_at: s.bath_changed_at, bath_alerted_at: s.bath_alerted_at,
    ...bathState(units.filter((u) => u.station_id === s.id).map((u) => ({ green_mass_g: num(u.green_mass_g), brown_mass_g: num(u.brown_mass_g) })), Number(s.bath_binder_limit_g)),
  }));
}

/** Gas on hand per gas, what scheduled runs will use, and the runs the supply cannot cover. */
export async function gasOutlook(db: Database): Promise<{ supplies: Array<{ gas: string; on_hand_l: number; counted_at: Date; note: string; version: number; scheduled_l: number }>; warnings: GasWarning[] }> {
  const [supplies, runs] = await Promise.all([
    db.selectFrom("gas_supplies").select(["gas", "on_hand_l", "counted_at", "note", "version"]).orderBy("gas").execute(),
    db
      .selectFrom("furnace_runs as r")
      .innerJoin("sinter_profiles as p", "p.id", "r.profile_id")
      .select(["r.id", "r.code", "p.process_gas as gas", "p.gas_flow_l_per_min", "r.cycle_minutes", "r.starts_at"])
      .where("r.state", "=", "scheduled")
      .where("r.starts_at", "is not", null)
      .execute(),
  ]);
  const gasRuns = runs.map((r) => ({ id: r.id, code: r.code, gas: r.gas, flow_l_per_min: Number(r.gas_flow_l_per_min), cycle_minutes: Number(r.cycle_minutes ?? 0), starts_at: new Date(r.starts_at!).toISOString() }));
  const onHand = Object.fromEntries(supplies.map((s) => [s.gas, Number(s.on_hand_l)]));
  return {
    supplies: supplies.map((s) => ({ ...s, on_hand_l: Number(s.on_hand_l), scheduled_l: Math.round(gasRuns.filter((r) => r.gas === s.gas).reduce((sum, r) => sum + runGasLitres(r), 0) * 10) / 10 })),
    warnings: gasShortfalls(gasRuns, onHand),
  };
}

export { drawRefusal };

/**
 * Which of these tentatively placed builds would find too little feedstock, when they are added
 * to what is already scheduled: for a planning proposal before anything is booked.
 */
export async function shortAmongProposed(db: Database, proposed: Array<{ build_id: string; code: string; starts_at: string }>, now = new Date()): Promise<Map<string, string>> {
  const out = new Map<string, string>();
  if (!proposed.length) return out;
  const last = proposed.reduce((m, p) => (p.starts_at > m ? p.starts_at : m), now.toISOString());
  const days = Math.min(400, Math.ceil((new Date(last).getTime() - now.getTime()) / 86_400_000) + 2);
  const ids = new Set(proposed.map((p) => p.build_id));
  const { today, materials } = await loadStockInputs(db, now, proposed);
  for (const m of materials) {
    if (!m.tracked || !m.builds.some((b) => ids.has(b.id))) continue;
    const projection = projectOnHand({ today, horizon_days: days, reorder_point_g: 0, lots: m.lots, builds: m.builds });
    for (const id of projection.short_builds) if (ids.has(id)) out.set(id, `${m.code} feedstock runs short on ${projection.first_short_day}`);
  }
  return out;
}
