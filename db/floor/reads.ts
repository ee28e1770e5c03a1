import { sql, type RawBuilder } from "kysely";
import type { Database } from "@/db/client";
import type { BuildUnitSpec, PrinterSpec } from "@/lib/builds/estimate";
import type { ShopTiming } from "@/lib/parts/projection";
import type { FloorData, FloorWindow } from "@/lib/floor/schemas";
import type { WeeklyPattern } from "@/lib/process/time-zone";
import { scaleUp } from "@/lib/process/scale-up";
import { WindowBody } from "@/lib/floor/window-body";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { changeStamp, viewerAndStamp, type Viewer } from "@/db/live/stamps";

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

// The floor's window is the most requested thing in the app, so it is one statement: each kind
// of lane contributes three JSON arrays (lanes, bookings, maintenance) as scalar subqueries, and
// PostgreSQL writes the JSON the route sends as it is. To grow a kind of lane (make it
// interactive, add fields), change only its function below; FloorResource, FloorEvent and
// FloorBlock in lib/floor/schemas.ts say what the client reads.

export type LaneSql = { resources: RawBuilder<unknown>; events: RawBuilder<unknown>; blocks: RawBuilder<unknown> };

// timestamptz goes into JSON as ISO 8601 with its offset, which every Date parser reads;
// to_char would cost more than the rest of the statement.
const isoSql = (col: RawBuilder<unknown>) => col;
const jsonArray = (inner: RawBuilder<unknown>) => sql`coalesce((${inner}), '[]'::json)`;
const windowRange = (w: FloorWindow) => sql`tstzrange(${w.from}::timestamptz, ${w.to}::timestamptz)`;

function maintenanceSql(kind: "printer" | "wash_station" | "furnace", w: FloorWindow): RawBuilder<unknown> {
  const col = sql.ref(kind === "printer" ? "mw.printer_id" : kind === "wash_station" ? "mw.wash_station_id" : "mw.furnace_id");
  return jsonArray(sql`
    select json_agg(json_build_object('id', mw.id, 'resource_id', ${col}, 'start', ${isoSql(sql.ref("mw.starts_at"))}, 'end', ${isoSql(sql.ref("mw.ends_at"))}, 'reason', mw.reason))
      from maintenance_windows mw
     where mw.resource = ${kind} and tstzrange(mw.starts_at, mw.ends_at) && ${windowRange(w)}`);
}

/** Printers and their builds in the window: the lanes a technician drags onto. */
export function printerLanesSql(w: FloorWindow): LaneSql {
  return {
    resources: jsonArray(sql`
      select json_agg(json_build_object(
               'id', p.id, 'kind', 'printer', 'title', p.name, 'group', 'Printers', 'editable', true,
               'build_x_mm', p.build_x_mm, 'build_y_mm', p.build_y_mm, 'build_z_mm', p.build_z_mm,
               'material_ids', coalesce((select json_agg(pm.material_id) from printer_materials pm where pm.printer_id = p.id), '[]'::json))
             order by p.name)
        from printers p
       where p.active`),
    // row_to_json writes no spaces (json_build_object does): a busy week is several hundred rows.
    events: jsonArray(sql`
      select json_agg(row_to_json(e)) from (
        select b.id, 'build' as kind, b.printer_id as resource_id, b.code || ' · ' || m.code as title,
               ${isoSql(sql.ref("b.starts_at"))} as start, ${isoSql(sql.ref("b.ends_at"))} as "end", b.state, b.version,
               -- a build on the plate or finished stays where it printed
               b.state = 'scheduled' as editable,
               m.code as material_code, b.material_id, b.failed
          from builds b
          join materials m on m.id = b.material_id
         where b.printer_id is not null
           and b.state in ('scheduled', 'running', 'complete')
           and tstzrange(b.starts_at, b.ends_at) && ${windowRange(w)}) e`),
    blocks: maintenanceSql("printer", w),
  };
}

/** Wash stations and their batches in the window; booked batches can be dragged (components/furnace/lane-interactions). */
export function washLanesSql(w: FloorWindow): LaneSql {
  return {
    resources: jsonArray(sql`
      select json_agg(json_build_object('id', s.id, 'kind', 'wash_station', 'title', s.name, 'group', 'Wash stations', 'editable', true) order by s.name)
        from wash_stations s
       where s.active`),
    events: jsonArray(sql`
      select json_agg(json_build_object(
               'id', wb.id, 'kind', 'wash_batch', 'resource_id', wb.wash_station_id, 'title', wb.code || ' · wash',
               'start', ${isoSql(sql.ref("wb.starts_at"))}, 'end', ${isoSql(sql.ref("wb.ends_at"))}, 'state', wb.state, 'version', wb.version,
               'editable', wb.state = 'scheduled'))
        from wash_batches wb
       where wb.wash_station_id is not null
         and wb.state in ('scheduled', 'running', 'complete')
         and tstzrange(wb.starts_at, wb.ends_at) && ${windowRange(w)}`),
    blocks: maintenanceSql("wash_station", w),
  };
}

/** Furnaces and their runs in the window; booked runs can be dragged (components/furnace/lane-interactions). */
export function furnaceLanesSql(w: FloorWindow): LaneSql {
  return {
    resources: jsonArray(sql`
      select json_agg(json_build_object(
               'id', f.id, 'kind', 'furnace', 'title', f.name, 'group', 'Furnaces', 'editable', true,
               'profile_ids', coalesce((select json_agg(fp.profile_id) from furnace_profiles fp where fp.furnace_id = f.id), '[]'::json))
             order by f.name)
        from furnaces f
       where f.active`),
    events: jsonArray(sql`
      select json_agg(json_build_object(
               'id', r.id, 'kind', 'furnace_run', 'resource_id', r.furnace_id, 'title', r.code || ' · ' || sp.code,
               'start', ${isoSql(sql.ref("r.starts_at"))}, 'end', ${isoSql(sql.ref("r.ends_at"))}, 'state', r.state, 'version', r.version,
               'editable', r.state = 'scheduled', 'profile_id', r.profile_id))
        from furnace_runs r
        join sinter_profiles sp on sp.id = r.profile_id
       where r.furnace_id is not null
         and r.state in ('scheduled', 'running', 'complete')
         and tstzrange(r.starts_at, r.ends_at) && ${windowRange(w)}`),
    blocks: maintenanceSql("furnace", w),
  };
}

export const LANE_KINDS = [printerLanesSql, washLanesSql, furnaceLanesSql];

/** Everything the floor shows for one window, as the JSON text of a FloorData. */
export async function loadFloorJson(db: Database, w: FloorWindow): Promise<string> {
  const lanes = LANE_KINDS.map((kind) => kind(w));
  // One text column per array: an array of texts would come back as a quoted array literal
  // that the driver unescapes character by character.
  const columns = (["resources", "events", "blocks"] as const).flatMap((key) => lanes.map((l, i) => sql`(${l[key]})::text as ${sql.ref(`${key[0]}${i}`)}`));
  const { rows } = await sql<Record<string, string>>`select ${sql.join(columns, sql`, `)}`.execute(db);
  const r = rows[0];
  const concat = (key: string) => `[${lanes.map((_, i) => r[`${key[0]}${i}`].trim().slice(1, -1).trim()).filter(Boolean).join(",")}]`;
  return `{"from":${JSON.stringify(w.from)},"to":${JSON.stringify(w.to)},"resources":${concat("resources")},"events":${concat("events")},"blocks":${concat("blocks")},"stamp":${JSON.stringify(new Date().toISOString())}}`;
}

/** Moves on every change to anything the floor shows (migration 202612012302). */
export function floorChangeStamp(db: Database): Promise<string> {
  return changeStamp(db, "floor");
}

export type FloorViewer = Viewer;

/** The active user a session names and the floor's change stamp in one round trip (db/live/stamps.ts). */
export function floorViewerAndStamp(db: Database, userId: string, sid?: string | null): Promise<{ viewer: FloorViewer | null; stamp: string }> {
  return viewerAndStamp(db, "floor", userId, sid);
}

/** The encoded body of one window, from the process-wide cache while the stamp holds. */
export function floorWindowBody(db: Database, w: FloorWindow, stamp: string): Promise<WindowBody> {
  return floorWindowCache().get(`${w.from}|${w.to}`, stamp, async () => WindowBody.ready(await loadFloorJson(db, w)));
}

export async function loadFloor(db: Database, w: FloorWindow): Promise<FloorData> {
  return JSON.parse(await loadFloorJson(db, w)) as FloorData;
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
    const spec: BuildUnitSpec = {
      unit_id: r.id,
      serial: r.serial,
      material_id: r.material_id,
      green_x_mm: green.x,
      green_y_mm: green.y,
      green_z_mm: green.z,
      green_volume_mm3: greenVolumeOf(r, green),
    };
    const list = out.get(r.build_id!) ?? [];
    list.push(spec);
    out.set(r.build_id!, list);
  }
  return out;
}

/** The printed volume of one unit: the part's volume grown by the scale-up on each axis. */
export function greenVolumeOf(r: GreenSource & { volume_mm3: unknown }, green = partGreen(r)): number {
  const nominal = { x: Number(r.nominal_x_mm), y: Number(r.nominal_y_mm), z: Number(r.nominal_z_mm) };
  const vol = n(r.volume_mm3);
  const grow = (green.x / nominal.x) * (green.y / nominal.y) * (green.z / nominal.z);
  // without geometry: half the bounding box, a middling fill for machined-looking parts
  return vol && vol > 0 ? vol * grow : 0.5 * green.x * green.y * green.z;
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
    .orderBy(sql`due_at`, (ob) => ob.asc().nullsLast())
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
