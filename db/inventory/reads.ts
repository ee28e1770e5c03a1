import { sql } from "kysely";
import type { Database } from "@/db/client";
import { greenVolumeOf } from "@/db/floor/reads";
import { AppError } from "@/lib/errors";
import { estimateDraw, type DrawEstimate } from "@/lib/inventory/consumption";
import { drawRefusal, type LotState } from "@/lib/inventory/lots";
import { projectOnHand } from "@/lib/inventory/projection";
import type { LotRow, MaterialProjection, MaterialStock } from "@/lib/inventory/types";
export type { LotRow, MaterialProjection, MaterialStock };
import { bathState, gasShortfalls, runGasLitres, type BathState, type GasWarning } from "@/lib/inventory/consumables";

const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const isUuid = (s: string) => /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(s);

/** Today in the shop's time zone, as YYYY-MM-DD (the day a lot expires or a build draws). */
export function shopDay(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" }).format(at);
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

/**
 * What each build will draw, from its units' printed volume, the material's feedstock density
 * and its allowances. One row per build and part (units of a part share a volume), so a busy
 * schedule costs one grouped query.
 */
export async function estimateBuildDraws(db: Database, filter: { buildIds?: string[]; scheduledOnly?: boolean }): Promise<Map<string, DrawEstimate & { material_id: string }>> {
  const out = new Map<string, DrawEstimate & { material_id: string }>();
  if (filter.buildIds && !filter.buildIds.length) return out;
  let q = db
    .selectFrom("units as u")
    .innerJoin("builds as b", "b.id", "u.build_id")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("materials as m", "m.id", "b.material_id")
    .select([
      "u.build_id", "b.material_id", "p.id as part_id", "p.volume_mm3", "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm",
      "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm", "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm",
      "m.shrink_xy", "m.shrink_z", "m.green_density_g_cm3", "m.support_allowance", "m.purge_g",
      sql<number>`count(*)::int`.as("units"),
    ])
    .where("u.state", "<>", "scrapped")
    .groupBy(["u.build_id", "b.material_id", "p.id", "m.id"]);
  if (filter.buildIds) q = q.where("u.build_id", "in", filter.buildIds);
  if (filter.scheduledOnly) q = q.where("b.state", "=", "scheduled").where("b.starts_at", "is not", null);
  const rows = await q.execute();
  const byBuild = new Map<string, typeof rows>();
  for (const r of rows) {
    const list = byBuild.get(r.build_id!);
    if (list) list.push(r);
    else byBuild.set(r.build_id!, [r]);
  }
  // A part's printed volume is the same in every build: worked out once per part.
  const volumeOf = new Map<string, number>();
  const partVolume = (p: (typeof rows)[number]) => {
    let v = volumeOf.get(p.part_id);
    if (v === undefined) volumeOf.set(p.part_id, (v = greenVolumeOf(p)));
    return v;
  };
  for (const [buildId, parts] of byBuild) {
    const m = parts[0];
    const units = parts.flatMap((p) => Array.from({ length: Number(p.units) }, () => ({ green_volume_mm3: partVolume(p) })));
    const est = estimateDraw(units, { feedstock_density_g_cm3: Number(m.green_density_g_cm3), support_allowance: Number(m.support_allowance), purge_g: Number(m.purge_g) });
    out.set(buildId, { ...est, material_id: m.material_id });
  }
  return out;
}


/** On hand, committed and projected per material over `days`, from the live schedule. */
export async function projectStock(db: Database, opts: { days: number; now?: Date; materialId?: string }): Promise<{ today: string; time_zone: string; materials: MaterialProjection[] }> {
  const now = opts.now ?? new Date();
  const zone = await findShopZone(db);
  const today = shopDay(now, zone);
  const [materials, lots, builds, draws] = await Promise.all([
    listMaterialStock(db),
    db
      .selectFrom("feedstock_lots")
      .select(["material_id", "state", "remaining_g", sql<string | null>`to_char(expires_on, 'YYYY-MM-DD')`.as("expires_on")])
      .where("state", "in", ["released", "quarantine"])
      .where("remaining_g", ">", 0)
      .execute(),
    db.selectFrom("builds").select(["id", "code", "material_id", "starts_at"]).where("state", "=", "scheduled").where("starts_at", "is not", null).execute(),
    estimateBuildDraws(db, { scheduledOnly: true }),
  ]);
  const out: MaterialProjection[] = [];
  for (const m of materials) {
    if (opts.materialId && m.id !== opts.materialId) continue;
    const mine = lots.filter((l) => l.material_id === m.id);
    const projection = projectOnHand({
      today,
      horizon_days: opts.days,
      reorder_point_g: m.reorder_point_g,
      lots: mine.map((l) => ({ remaining_g: Number(l.remaining_g), expires_on: l.expires_on, usable: l.state === "released" && !(l.expires_on && l.expires_on < today) })),
      builds: builds
        .filter((b) => b.material_id === m.id)
        .map((b) => ({ id: b.id, code: b.code, day: shopDay(new Date(b.starts_at!), zone), grams: draws.get(b.id)?.total_g ?? 0 })),
    });
    const quarantine = mine.filter((l) => l.state === "quarantine").reduce((s, l) => s + Number(l.remaining_g), 0);
    out.push({ ...m, quarantine_g: Math.round(quarantine * 10) / 10, projection });
  }
  return { today, time_zone: zone, materials: out };
}

/** Scheduled builds whose feedstock will not be on the shelf when they start, with the reason. */
export async function listShortBuilds(db: Database, days = 90): Promise<Array<{ build_id: string; material_code: string; first_short_day: string }>> {
  const { materials } = await projectStock(db, { days });
  return materials.flatMap((m) => m.projection.short_builds.map((id) => ({ build_id: id, material_code: m.code, first_short_day: m.projection.first_short_day! })));
}

export type GenealogyRow = {
  unit_id: string; serial: string; state: string; build_id: string; build_code: string; printer: string | null; drawn_g: number;
  wash_batch_code: string | null; furnace_run_code: string | null; profile_code: string | null; inspections: number; passed: boolean | null;
  part_number: string; order_id: string; order_code: string; customer: string;
};

/** Every unit a lot reached, with its path through the shop, in one query. */
export async function lotGenealogy(db: Database, lotId: string): Promise<GenealogyRow[]> {
  const rows = await db
    .selectFrom("feedstock_draws as d")
    .innerJoin("builds as b", "b.id", "d.build_id")
    .innerJoin("units as u", "u.build_id", "b.id")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("orders as o", "o.id", "p.order_id")
    .leftJoin("printers as pr", "pr.id", "b.printer_id")
    .leftJoin("wash_batches as w", "w.id", "u.wash_batch_id")
    .leftJoin("furnace_runs as r", "r.id", "u.furnace_run_id")
    .leftJoin("sinter_profiles as sp", "sp.id", "r.profile_id")
    .select([
      "u.id as unit_id", "u.serial", "u.state", "b.id as build_id", "b.code as build_code", "pr.name as printer", "d.drawn_g",
      "w.code as wash_batch_code", "r.code as furnace_run_code", "sp.code as profile_code", "p.part_number", "o.id as order_id", "o.code as order_code", "o.customer",
      sql<number>`(select count(*)::int from inspections i where i.unit_id = u.id)`.as("inspections"),
      sql<boolean | null>`(select i.passed from inspections i where i.unit_id = u.id order by i.created_at desc limit 1)`.as("passed"),
    ])
    .where("d.lot_id", "=", lotId)
    .orderBy("b.code")
    .orderBy("u.serial")
    .execute();
  return rows.map((r) => ({ ...r, drawn_g: Number(r.drawn_g), inspections: Number(r.inspections) }));
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
  const zone = await findShopZone(db);
  const today = shopDay(now, zone);
  const last = proposed.reduce((m, p) => (p.starts_at > m ? p.starts_at : m), now.toISOString());
  const days = Math.min(400, Math.ceil((new Date(last).getTime() - now.getTime()) / 86_400_000) + 2);
  const ids = proposed.map((p) => p.build_id);
  const [materials, lots, scheduled] = await Promise.all([
    listMaterialStock(db),
    db
      .selectFrom("feedstock_lots")
      .select(["material_id", "remaining_g", sql<string | null>`to_char(expires_on, 'YYYY-MM-DD')`.as("expires_on")])
      .where("state", "=", "released")
      .where("remaining_g", ">", 0)
      .execute(),
    db.selectFrom("builds").select(["id", "code", "material_id", "starts_at"]).where("state", "=", "scheduled").where("starts_at", "is not", null).where("id", "not in", ids).execute(),
  ]);
  const draws = await estimateBuildDraws(db, { buildIds: [...scheduled.map((b) => b.id), ...ids] });
  const tracked = new Set((await db.selectFrom("feedstock_lots").select("material_id").distinct().execute()).map((r) => r.material_id));
  for (const m of materials) {
    if (!tracked.has(m.id)) continue;
    const mineProposed = proposed.filter((p) => draws.get(p.build_id)?.material_id === m.id);
    if (!mineProposed.length) continue;
    const projection = projectOnHand({
      today,
      horizon_days: days,
      reorder_point_g: 0,
      lots: lots.filter((l) => l.material_id === m.id).map((l) => ({ remaining_g: Number(l.remaining_g), expires_on: l.expires_on, usable: !(l.expires_on && l.expires_on < today) })),
      builds: [
        ...scheduled.filter((b) => b.material_id === m.id).map((b) => ({ id: b.id, code: b.code, day: shopDay(new Date(b.starts_at!), zone), grams: draws.get(b.id)?.total_g ?? 0 })),
        ...mineProposed.map((p) => ({ id: p.build_id, code: p.code, day: shopDay(new Date(p.starts_at), zone), grams: draws.get(p.build_id)?.total_g ?? 0 })),
      ],
    });
    for (const id of projection.short_builds) if (ids.includes(id)) out.set(id, `${m.code} feedstock runs short on ${projection.first_short_day}`);
  }
  return out;
}
