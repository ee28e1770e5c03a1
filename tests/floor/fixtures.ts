import { sql } from "kysely";
import type { Database } from "@/db/client";
import { api } from "../helpers/session";

// Rows of their own for the floor, parts and builds tests: a printer nobody else books, and
// orders, parts and draft builds made through the real API with unique names.

export const uniq = (prefix: string) => `${prefix}-${Date.now().toString(36)}${Math.floor(Math.random() * 1e6).toString(36)}`.toUpperCase();

export async function materialId(db: Database, code: string): Promise<string> {
  const m = await db.selectFrom("materials").select("id").where("code", "=", code).executeTakeFirstOrThrow();
  return m.id;
}

export async function makePrinter(
  db: Database,
  opts: { materials: string[]; build?: [number, number, number]; rate?: number; name?: string },
): Promise<{ id: string; name: string }> {
  const name = opts.name ?? uniq("TP");
  const [x, y, z] = opts.build ?? [300, 250, 200];
  const row = await db
    .insertInto("printers")
    .values({ name, build_x_mm: x, build_y_mm: y, build_z_mm: z, deposition_cm3_per_h: opts.rate ?? 20, layer_height_mm: 0.15, layer_overhead_s: 8 })
    .returning("id")
    .executeTakeFirstOrThrow();
  for (const code of opts.materials) {
    await db.insertInto("printer_materials").values({ printer_id: row.id, material_id: await materialId(db, code) }).execute();
  }
  return { id: row.id, name };
}

/** Test printers are taken out of service afterwards so they do not crowd other runs' floors. */
export async function retirePrinters(db: Database, ids: string[]) {
  if (!ids.length) return;
  await db.updateTable("printers").set({ active: false }).where("id", "in", ids).execute();
}

export async function makeOrder(cookie: string, opts: { due?: Date; code?: string } = {}) {
  const res = await api("/api/orders", {
    method: "POST",
    cookie,
    body: { code: opts.code ?? uniq("T5"), customer: "Test Foundry", due_at: (opts.due ?? new Date(Date.now() + 10 * 86_400_000)).toISOString(), priority: 3 },
  });
  if (res.status !== 201) throw new Error(`order: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.order as { id: string; code: string; version: number };
}

export async function makePart(
  cookie: string,
  db: Database,
  opts: { order_id: string; material: string; quantity?: number; size?: [number, number, number]; part_number?: string },
) {
  const [x, y, z] = opts.size ?? [40, 30, 20];
  const res = await api("/api/parts", {
    method: "POST",
    cookie,
    body: {
      order_id: opts.order_id, part_number: opts.part_number ?? uniq("P"), revision: "A", name: "test bracket", material_id: await materialId(db, opts.material),
      quantity: opts.quantity ?? 1, nominal_x_mm: x, nominal_y_mm: y, nominal_z_mm: z, thickest_wall_mm: 4,
      stock_x_neg_mm: 0.3, stock_x_pos_mm: 0.3, stock_z_pos_mm: 0.2,
    },
  });
  if (res.status !== 201) throw new Error(`part: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.part as { id: string; part_number: string; version: number };
}

export async function unitsOf(db: Database, partId: string) {
  return db.selectFrom("units").select(["id", "serial", "state", "build_id", "version"]).where("part_id", "=", partId).orderBy("serial").execute();
}

export async function makeBuild(cookie: string, unitIds: string[]) {
  const res = await api("/api/builds", { method: "POST", cookie, body: { unit_ids: unitIds, material_lot: "LOT-T" } });
  if (res.status !== 201) throw new Error(`build: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body.build as { id: string; code: string; version: number; material_id: string };
}

/** A draft build of `quantity` units of one new part on one new order. */
export async function makeDraftBuild(cookie: string, db: Database, opts: { material: string; quantity?: number; size?: [number, number, number]; due?: Date }) {
  const order = await makeOrder(cookie, { due: opts.due });
  const part = await makePart(cookie, db, { order_id: order.id, material: opts.material, quantity: opts.quantity, size: opts.size });
  const units = await unitsOf(db, part.id);
  const build = await makeBuild(cookie, units.map((u) => u.id));
  return { order, part, units, build };
}

/** Pairs of bookings on one printer that overlap in time: must always be empty. */
export async function overlapsOn(db: Database, printerId: string) {
  const r = await sql<{ a: string; b: string }>`
    select x.code as a, y.code as b from builds x join builds y
      on x.printer_id = y.printer_id and x.id < y.id
     and tstzrange(x.starts_at, x.ends_at) && tstzrange(y.starts_at, y.ends_at)
   where x.printer_id = ${printerId}
     and x.state in ('scheduled', 'running', 'complete') and y.state in ('scheduled', 'running', 'complete')`.execute(db);
  return r.rows;
}

/** Whole hours from now, on the hour, so slots line up with the timeline's grid. */
export function hoursFromNow(h: number): Date {
  const d = new Date(Date.now() + h * 3_600_000);
  d.setUTCMinutes(0, 0, 0);
  return d;
}
