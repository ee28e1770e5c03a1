import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { BuildUnitSpec, PrinterSpec } from "@/lib/builds/estimate";
import type { ShopTiming } from "@/lib/parts/projection";
import type { FloorBlock, FloorData, FloorEvent, FloorResource, FloorWindow } from "@/lib/floor/schemas";
import type { WeeklyPattern } from "@/lib/process/time-zone";
import { scaleUp } from "@/lib/process/scale-up";

// The floor's data, one loader per kind of lane so that each kind can grow on its own
// (the batching work makes wash and furnace lanes interactive through their own loaders).
// Every loader reads only the bookings that touch the visible window.

const n = (v: unknown) => (v === null || v === undefined ? null : Number(v));
const iso = (d: Date | string) => (d instanceof Date ? d.toISOString() : new Date(d).toISOString());

export type ShopPlanning = ShopTiming & { plate_clearance_mm: number; shop_name: string };

export async function getShopPlanning(db: Database): Promise<ShopPlanning> {
  const row = await db
    .selectFrom("shop_settings")
    .select(["shop_name", "time_zone", "staffed_hours", "drying_minutes", "finishing_lead_minutes", "at_risk_margin_minutes", "plate_clearance_mm"])
    .where("id", "=", 1)
    .executeTakeFirst();
  return {
    shop_name: row?.shop_name ?? "Hearth",
    time_zone: row?.time_zone ?? "UTC",
    staffed_hours: (row?.staffed_hours as WeeklyPattern | undefined) ?? [],
    drying_minutes: row?.drying_minutes ?? 120,
    finishing_lead_minutes: row?.finishing_lead_minutes ?? 1440,
    at_risk_margin_minutes: row?.at_risk_margin_minutes ?? 1440,
    plate_clearance_mm: n(row?.plate_clearance_mm) ?? 5,
  };
}

export async function listPrinterSpecs(db: Database, opts: { activeOnly?: boolean } = {}): Promise<PrinterSpec[]> {
  let q = db
    .selectFrom("printers as p")
    .select([
      "p.id", "p.name", "p.build_x_mm", "p.build_y_mm", "p.build_z_mm", "p.deposition_cm3_per_h", "p.layer_height_mm", "p.layer_overhead_s", "p.active",
      sql<string[]>`coalesce((select array_agg(pm.material_id::text) from printer_materials pm where pm.printer_id = p.id), '{}')`.as("material_ids"),
    ])
    .orderBy("p.name");
  if (opts.activeOnly) q = q.where("p.active", "=", true);
  const rows = await q.execute();
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    build_x_mm: Number(r.build_x_mm),
    build_y_mm: Number(r.build_y_mm),
    build_z_mm: Number(r.build_z_mm),
    deposition_cm3_per_h: Number(r.deposition_cm3_per_h),
    layer_height_mm: Number(r.layer_height_mm),
    layer_overhead_s: Number(r.layer_overhead_s),
    material_ids: r.material_ids,
    active: r.active,
  }));
}

const overlapsWindow = (w: FloorWindow) => sql<boolean>`tstzrange(starts_at, ends_at) && tstzrange(${w.from}::timestamptz, ${w.to}::timestamptz)`;

export type LaneData = { resources: FloorResource[]; events: FloorEvent[]; blocks: FloorBlock[] };

async function maintenanceFor(db: Database, kind: "printer" | "wash_station" | "furnace", w: FloorWindow): Promise<FloorBlock[]> {
  const col = kind === "printer" ? "printer_id" : kind === "wash_station" ? "wash_station_id" : "furnace_id";
  const rows = await db
    .selectFrom("maintenance_windows")
    .select(["id", col, "starts_at", "ends_at", "reason"])
    .where("resource", "=", kind)
    .where(overlapsWindow(w))
    .execute();
  return rows.map((r) => ({ id: r.id, resource_id: (r as Record<string, unknown>)[col] as string, start: iso(r.starts_at), end: iso(r.ends_at), reason: r.reason }));
}

/** Printers and their builds in the window: the lanes a technician drags onto. */
export async function loadPrinterLanes(db: Database, w: FloorWindow): Promise<LaneData> {
  const [printers, builds, blocks] = await Promise.all([
    listPrinterSpecs(db, { activeOnly: true }),
    db
      .selectFrom("builds as b")
      .innerJoin("materials as m", "m.id", "b.material_id")
      .select([
        "b.id", "b.code", "b.printer_id", "b.starts_at", "b.ends_at", "b.state", "b.version", "b.failed", "b.material_id", "m.code as material_code",
        sql<number>`(select count(*) from units u where u.build_id = b.id)`.as("unit_count"),
      ])
      .where("b.printer_id", "is not", null)
      .where("b.state", "in", ["scheduled", "running", "complete"])
      .where(sql<boolean>`tstzrange(b.starts_at, b.ends_at) && tstzrange(${w.from}::timestamptz, ${w.to}::timestamptz)`)
      .execute(),
    maintenanceFor(db, "printer", w),
  ]);
  return {
    resources: printers.map((p) => ({
      id: p.id,
      kind: "printer",
      title: p.name,
      group: "Printers",
      editable: true,
      build_x_mm: p.build_x_mm,
      build_y_mm: p.build_y_mm,
      build_z_mm: p.build_z_mm,
      material_ids: p.material_ids,
    })),
    events: builds.map((b) => ({
      id: b.id,
      kind: "build",
      resource_id: b.printer_id!,
      title: `${b.code} · ${b.material_code}`,
      start: iso(b.starts_at!),
      end: iso(b.ends_at!),
      state: b.state,
      version: b.version,
      // a build on the plate or finished stays where it printed
      editable: b.state === "scheduled",
      material_code: b.material_code,
      material_id: b.material_id,
      failed: b.failed,
      unit_count: Number(b.unit_count),
    })),
    blocks,
  };
}

/** Wash stations and their batches in the window; booked batches can be dragged (components/furnace/lane-interactions). */
export async function loadWashLanes(db: Database, w: FloorWindow): Promise<LaneData> {
  const [stations, batches, blocks] = await Promise.all([
    db.selectFrom("wash_stations").select(["id", "name"]).where("active", "=", true).orderBy("name").execute(),
    db
      .selectFrom("wash_batches")
      .select(["id", "code", "wash_station_id", "starts_at", "ends_at", "state", "version"])
      .where("wash_station_id", "is not", null)
      .where("state", "in", ["scheduled", "running", "complete"])
      .where(overlapsWindow(w))
      .execute(),
    maintenanceFor(db, "wash_station", w),
  ]);
  return {
    resources: stations.map((s) => ({ id: s.id, kind: "wash_station", title: s.name, group: "Wash stations", editable: true })),
    events: batches.map((b) => ({
      id: b.id, kind: "wash_batch", resource_id: b.wash_station_id!, title: `${b.code} · wash`, start: iso(b.starts_at!), end: iso(b.ends_at!),
      state: b.state, version: b.version, editable: b.state === "scheduled",
    })),
    blocks,
  };
}

/** Furnaces and their runs in the window; booked runs can be dragged (components/furnace/lane-interactions). */
export async function loadFurnaceLanes(db: Database, w: FloorWindow): Promise<LaneData> {
  const [furnaces, runs, blocks, links] = await Promise.all([
    db.selectFrom("furnaces").select(["id", "name"]).where("active", "=", true).orderBy("name").execute(),
    db
      .selectFrom("furnace_runs as r")
      .innerJoin("sinter_profiles as p", "p.id", "r.profile_id")
      .select(["r.id", "r.code", "r.furnace_id", "r.starts_at", "r.ends_at", "r.state", "r.version", "r.profile_id", "p.code as profile_code"])
      .where("r.furnace_id", "is not", null)
      .where("r.state", "in", ["scheduled", "running", "complete"])
      .where(sql<boolean>`tstzrange(r.starts_at, r.ends_at) && tstzrange(${w.from}::timestamptz, ${w.to}::timestamptz)`)
      .execute(),
    maintenanceFor(db, "furnace", w),
    db.selectFrom("furnace_profiles").select(["furnace_id", "profile_id"]).execute(),
  ]);
  return {
    resources: furnaces.map((f) => ({ id: f.id, kind: "furnace", title: f.name, group: "Furnaces", editable: true, profile_ids: links.filter((l) => l.furnace_id === f.id).map((l) => l.profile_id) })),
    events: runs.map((r) => ({
      id: r.id, kind: "furnace_run", resource_id: r.furnace_id!, title: `${r.code} · ${r.profile_code}`, start: iso(r.starts_at!), end: iso(r.ends_at!),
      state: r.state, version: r.version, editable: r.state === "scheduled", profile_id: r.profile_id,
    })),
    blocks,
  };
}

/** Everything the floor shows for one window. */
export async function loadFloor(db: Database, w: FloorWindow): Promise<FloorData> {
  const lanes = await Promise.all([loadPrinterLanes(db, w), loadWashLanes(db, w), loadFurnaceLanes(db, w)]);
  return {
    from: w.from,
    to: w.to,
    resources: lanes.flatMap((l) => l.resources),
    events: lanes.flatMap((l) => l.events),
    blocks: lanes.flatMap((l) => l.blocks),
    stamp: new Date().toISOString(),
  };
}

// Build contents -------------------------------------------------------------------------------

/** Units of the given builds with the green sizes and volumes the estimates need. */
export async function unitSpecsForBuilds(db: Database, buildIds: string[]): Promise<Map<string, BuildUnitSpec[]>> {
  const out = new Map<string, BuildUnitSpec[]>();
  if (buildIds.length === 0) return out;
  const rows = await db
    .selectFrom("units as u")
    .innerJoin("parts as p", "p.id", "u.part_id")
    .innerJoin("materials as m", "m.id", "p.material_id")
    .select([
      "u.id", "u.serial", "u.build_id", "p.material_id", "p.volume_mm3",
      "p.nominal_x_mm", "p.nominal_y_mm", "p.nominal_z_mm", "p.green_x_mm", "p.green_y_mm", "p.green_z_mm",
      "p.stock_x_neg_mm", "p.stock_x_pos_mm", "p.stock_y_neg_mm", "p.stock_y_pos_mm", "p.stock_z_neg_mm", "p.stock_z_pos_mm",
      "m.shrink_xy", "m.shrink_z",
    ])
    .where("u.build_id", "in", buildIds)
    .where("u.state", "<>", "scrapped")
    .orderBy("u.serial")
    .execute();
  for (const r of rows) {
    const green = partGreen(r);
    const nominal = { x: Number(r.nominal_x_mm), y: Number(r.nominal_y_mm), z: Number(r.nominal_z_mm) };
    const vol = n(r.volume_mm3);
    const grow = (green.x / nominal.x) * (green.y / nominal.y) * (green.z / nominal.z);
    const spec: BuildUnitSpec = {
      unit_id: r.id,
      serial: r.serial,
      material_id: r.material_id,
      green_x_mm: green.x,
      green_y_mm: green.y,
      green_z_mm: green.z,
      // without geometry: half the bounding box, a middling fill for machined-looking parts
      green_volume_mm3: vol && vol > 0 ? vol * grow : 0.5 * green.x * green.y * green.z,
    };
    const list = out.get(r.build_id!) ?? [];
    list.push(spec);
    out.set(r.build_id!, list);
  }
  return out;
}

type GreenSource = {
  nominal_x_mm: unknown; nominal_y_mm: unknown; nominal_z_mm: unknown;
  green_x_mm: unknown; green_y_mm: unknown; green_z_mm: unknown;
  stock_x_neg_mm: unknown; stock_x_pos_mm: unknown; stock_y_neg_mm: unknown; stock_y_pos_mm: unknown; stock_z_neg_mm: unknown; stock_z_pos_mm: unknown;
  shrink_xy: unknown; shrink_z: unknown;
};

/** The stored green size, or (before the worker has scaled the part) the scale-up itself. */
export function partGreen(r: GreenSource): { x: number; y: number; z: number } {
  const gx = n(r.green_x_mm), gy = n(r.green_y_mm), gz = n(r.green_z_mm);
  if (gx && gy && gz) return { x: gx, y: gy, z: gz };
  const s = scaleUp({
    nominal: { x: Number(r.nominal_x_mm), y: Number(r.nominal_y_mm), z: Number(r.nominal_z_mm) },
    stock: {
      x_neg: Number(r.stock_x_neg_mm), x_pos: Number(r.stock_x_pos_mm), y_neg: Number(r.stock_y_neg_mm),
      y_pos: Number(r.stock_y_pos_mm), z_neg: Number(r.stock_z_neg_mm), z_pos: Number(r.stock_z_pos_mm),
    },
    shrink: { xy: Number(r.shrink_xy), z: Number(r.shrink_z) },
  });
  return { x: s.x.green, y: s.y.green, z: s.z.green };
}

export type UnscheduledRow = { id: string; code: string; version: number; material_id: string; material_code: string; due_at: Date | null; notes: string };

/** Builds not on the floor yet (drafts), earliest due first. */
export async function listUnscheduledBuilds(db: Database, ids?: string[]): Promise<UnscheduledRow[]> {
  let q = db
    .selectFrom("builds as b")
    .innerJoin("materials as m", "m.id", "b.material_id")
    .select([
      "b.id", "b.code", "b.version", "b.material_id", "m.code as material_code", "b.notes",
      sql<Date | null>`(select min(o.due_at) from units u join parts p on p.id = u.part_id join orders o on o.id = p.order_id where u.build_id = b.id)`.as("due_at"),
    ])
    .where("b.state", "=", "draft")
    .orderBy(sql`due_at`, sql`asc nulls last`)
    .orderBy("b.code")
    .limit(500);
  if (ids) q = q.where("b.id", "in", ids.length ? ids : ["00000000-0000-0000-0000-000000000000"]);
  return q.execute();
}

/** Booked intervals per printer from `from` on (what a plan must not overlap). */
export async function printerBlockedFrom(db: Database, from: Date): Promise<Map<string, Array<[number, number]>>> {
  const [bookings, maintenance] = await Promise.all([
    db
      .selectFrom("builds")
      .select(["printer_id", "starts_at", "ends_at"])
      .where("printer_id", "is not", null)
      .where("state", "in", ["scheduled", "running", "complete"])
      .where("ends_at", ">", from)
      .execute(),
    db
      .selectFrom("maintenance_windows")
      .select(["printer_id", "starts_at", "ends_at"])
      .where("resource", "=", "printer")
      .where("ends_at", ">", from)
      .execute(),
  ]);
  const out = new Map<string, Array<[number, number]>>();
  for (const r of [...bookings, ...maintenance]) {
    if (!r.printer_id || !r.starts_at || !r.ends_at) continue;
    const list = out.get(r.printer_id) ?? [];
    list.push([new Date(r.starts_at).getTime(), new Date(r.ends_at).getTime()]);
    out.set(r.printer_id, list);
  }
  return out;
}
