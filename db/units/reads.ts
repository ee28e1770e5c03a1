import type { PrintedUnit } from "@/lib/pdf/printed-unit";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { ListUnits } from "@/lib/parts/schemas";
import { projectUnitRow, summarize, type ProjectionSummary, type UnitProjectionRow } from "@/lib/parts/projection";
import { printMinutes } from "@/lib/process/print-time";
import { washMinutes } from "@/lib/process/wash";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import type { UnitProjection } from "@/lib/process/projection";
import { getShopPlanning, listPrinterSpecs, partGreen, type ShopPlanning } from "@/db/floor/reads";
import { PART_SIZE_COLUMNS, unitsWithStages } from "@/db/units/joins";

const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));

// Projection ------------------------------------------------------------------------------------

export type ProjectionContext = {
  shop: ShopPlanning;
  /** Fastest compatible printer's timing per material. */
  printer: Map<string, { deposition_cm3_per_h: number; layer_height_mm: number; layer_overhead_s: number }>;
  /** Cycle of the material's default sinter profile, minutes. */
  cycle: Map<string, number>;
  now: Date;
};

export async function loadProjectionContext(db: Database, now = new Date()): Promise<ProjectionContext> {
  const [shop, printers, materials, segments] = await Promise.all([
    getShopPlanning(db),
    listPrinterSpecs(db, { activeOnly: true }),
    db
      .selectFrom("materials as m")
      .leftJoin("sinter_profiles as sp", "sp.id", "m.default_profile_id")
      .select(["m.id", "sp.id as profile_id", "sp.start_temp_c", "sp.cool_rate_c_per_min", "sp.cool_to_c"])
      .execute(),
    db.selectFrom("sinter_profile_segments").select(["profile_id", "position", "rate_c_per_min", "setpoint_c", "hold_min"]).orderBy("position").execute(),
  ]);
  const printer: ProjectionContext["printer"] = new Map();
  for (const p of printers) {
    for (const mid of p.material_ids) {
      const have = printer.get(mid);
      if (!have || p.deposition_cm3_per_h > have.deposition_cm3_per_h) printer.set(mid, p);
    }
  }
  const cycle = new Map<string, number>();
  for (const m of materials) {
    const segs = segments.filter((s) => s.profile_id === m.profile_id);
    if (!m.profile_id || !segs.length) continue;
    try {
      const c = furnaceCycle({
        startTempC: Number(m.start_temp_c),
        coolRateCPerMin: Number(m.cool_rate_c_per_min),
        coolToC: Number(m.cool_to_c),
        segments: segs.map((s) => ({ rateCPerMin: Number(s.rate_c_per_min), setpointC: Number(s.setpoint_c), holdMin: Number(s.hold_min) })),
      });
      cycle.set(m.id, c.totalMinutes);
    } catch {
      // a profile that does not validate gives no estimate; the projection uses a day
    }
  }
  return { shop, printer, cycle, now };
}

function unitRowsQuery(db: Database) {
  return unitsWithStages(db)
    .select([
      "u.id", "u.serial", "u.state", "u.held_from", "u.hold_reason", "u.scrap_reason", "u.state_changed_at", "u.version", "u.build_id",
      "p.id as part_id", "p.part_number", "p.revision", "p.name as part_name", "p.material_id", "p.thickest_wall_mm", "p.volume_mm3",
      ...PART_SIZE_COLUMNS,
      "o.id as order_id", "o.code as order_code", "o.due_at", "o.priority",
      "m.code as material_code", "m.shrink_xy", "m.shrink_z", "m.wash_k_min_per_mm2", "m.wash_min_minutes",
      "b.code as build_code", "b.state as build_state", "b.starts_at as build_starts_at", "b.ends_at as build_ends_at", "b.finished_at as build_finished_at", "b.est_minutes as build_est_minutes",
      "w.code as wash_code", "w.state as wash_state", "w.starts_at as wash_starts_at", "w.ends_at as wash_ends_at",
      "r.code as run_code", "r.state as run_state", "r.starts_at as run_starts_at", "r.ends_at as run_ends_at",
    ]);
}

type UnitRow = Awaited<ReturnType<ReturnType<typeof unitRowsQuery>["execute"]>>[number];

export function projectionRowOf(r: UnitRow, ctx: ProjectionContext): UnitProjectionRow {
  const green = partGreen(r);
  const vol = n(r.volume_mm3);
  const grow = (green.x / Number(r.nominal_x_mm)) * (green.y / Number(r.nominal_y_mm)) * (green.z / Number(r.nominal_z_mm));
  const greenVolume = vol && vol > 0 ? vol * grow : 0.5 * green.x * green.y * green.z;
  const timing = ctx.printer.get(r.material_id);
  const print = n(r.build_est_minutes)
    ?? (timing
      ? printMinutes({ greenVolumeMm3: greenVolume, heightMm: green.z }, { depositionCm3PerH: timing.deposition_cm3_per_h, layerHeightMm: timing.layer_height_mm, layerOverheadS: timing.layer_overhead_s }).totalMinutes
      : 24 * 60);
  return {
    state: r.state,
    held_from: r.held_from,
    state_changed_at: new Date(r.state_changed_at),
    due_at: new Date(r.due_at),
    build: r.build_state ? { state: r.build_state, starts_at: r.build_starts_at, ends_at: r.build_ends_at, finished_at: r.build_finished_at } : null,
    wash: r.wash_state ? { state: r.wash_state, starts_at: r.wash_starts_at, ends_at: r.wash_ends_at } : null,
    furnace: r.run_state ? { state: r.run_state, starts_at: r.run_starts_at, ends_at: r.run_ends_at } : null,
    print_minutes: print,
    wash_minutes: washMinutes({ thickestWallMm: Number(r.thickest_wall_mm), kMinPerMm2: Number(r.wash_k_min_per_mm2), minMinutes: Number(r.wash_min_minutes) }),
    furnace_minutes: ctx.cycle.get(r.material_id) ?? 24 * 60,
  };
}

export function projectRow(r: UnitRow, ctx: ProjectionContext): UnitProjection | null {
  try {
    return projectUnitRow(projectionRowOf(r, ctx), ctx.shop, ctx.now);
  } catch {
    // Bad shop data (no staffed hours that ever come round) must not break the table.
    return projectUnitRow(projectionRowOf(r, ctx), { ...ctx.shop, staffed_hours: [] }, ctx.now);
  }
}

// Lists -----------------------------------------------------------------------------------------

const UNIT_SORT_COLUMNS = {
  serial: "u.serial",
  state: "u.state",
  part_number: "p.part_number",
  due_at: "o.due_at",
  material_code: "m.code",
  state_changed_at: "u.state_changed_at",
} as const;

export type UnitListRow = {
  id: string; serial: string; state: string; version: number; hold_reason: string | null; scrap_reason: string | null;
  part_id: string; part_number: string; revision: string; part_name: string; material_id: string; material_code: string;
  order_id: string; order_code: string; due_at: string; build_id: string | null; build_code: string | null; build_state: string | null;
  wash_code: string | null; run_code: string | null; state_changed_at: string;
  projection: ProjectionSummary;
};

export async function listUnits(db: Database, q: ListUnits): Promise<{ rows: UnitListRow[]; total: number }> {
  let query = unitRowsQuery(db).select(sql<number>`count(*) over ()`.as("total_count"));
  if (q.state) query = query.where("u.state", "=", q.state);
  if (q.part_id) query = query.where("u.part_id", "=", q.part_id);
  if (q.order_id) query = query.where("p.order_id", "=", q.order_id);
  if (q.material_id) query = query.where("p.material_id", "=", q.material_id);
  if (q.unbuilt) query = query.where("u.build_id", "is", null).where("u.state", "=", "planned");
  if (q.search) {
    const like = `%${q.search.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    query = query.where((eb) => eb.or([eb("u.serial", "ilike", like), eb("p.part_number", "ilike", like), eb("o.code", "ilike", like), eb("p.name", "ilike", like)]));
  }
  const rows = await query
    .orderBy(sql.ref(UNIT_SORT_COLUMNS[q.sort]), q.dir)
    .orderBy("u.serial")
    .limit(q.page_size)
    .offset((q.page - 1) * q.page_size)
    .execute();
  const ctx = await loadProjectionContext(db);
  return {
    total: rows.length ? Number(rows[0].total_count) : q.page > 1 ? await countUnits(db, q) : 0,
    rows: rows.map((r) => ({
      id: r.id, serial: r.serial, state: r.state, version: r.version, hold_reason: r.hold_reason, scrap_reason: r.scrap_reason,
      part_id: r.part_id, part_number: r.part_number, revision: r.revision, part_name: r.part_name, material_id: r.material_id, material_code: r.material_code,
      order_id: r.order_id, order_code: r.order_code, due_at: new Date(r.due_at).toISOString(),
      build_id: r.build_id, build_code: r.build_code, build_state: r.build_state, wash_code: r.wash_code, run_code: r.run_code,
      state_changed_at: new Date(r.state_changed_at).toISOString(),
      projection: summarize(projectRow(r, ctx)),
    })),
  };
}

async function countUnits(db: Database, q: ListUnits): Promise<number> {
  const r = await listUnits(db, { ...q, page: 1 });
  return r.total;
}

/** Every unit of the given orders with its projection (for the orders table). */
export async function projectionsForOrders(db: Database, orderIds: string[], ctx?: ProjectionContext): Promise<Map<string, Array<UnitProjection | null>>> {
  const out = new Map<string, Array<UnitProjection | null>>();
  if (!orderIds.length) return out;
  const c = ctx ?? (await loadProjectionContext(db));
  const rows = await unitRowsQuery(db).where("p.order_id", "in", orderIds).execute();
  for (const r of rows) {
    const list = out.get(r.order_id) ?? [];
    list.push(projectRow(r, c));
    out.set(r.order_id, list);
  }
  return out;
}

// Labels ----------------------------------------------------------------------------------------

export type UnitLabelRow = PrintedUnit & {
  id: string;
};

/** The units of one build or one furnace run, in serial order, with what their labels print. */
export async function listUnitLabels(db: Database, on: { build_id: string } | { furnace_run_id: string }): Promise<UnitLabelRow[]> {
  let q = unitsWithStages(db).select([
    "u.id", "u.serial", "p.part_number", "p.revision", "p.name as part_name", "o.code as order_code", "o.customer", "m.code as material_code", "m.name as material_name",
  ]);
  q = "build_id" in on ? q.where("u.build_id", "=", on.build_id) : q.where("u.furnace_run_id", "=", on.furnace_run_id);
  return q.orderBy("u.serial").execute();
}
