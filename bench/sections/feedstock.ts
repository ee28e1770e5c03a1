// npm run bench -- --only feedstock
// The feedstock projection and a lot's genealogy at a busy shop's size, against a database of
// their own (hearth_bench_feedstock): the demo shop plus 10,000 scheduled builds over the next
// 90 days on 120 bench printers (one to three units each), and one lot drawn by 1,000 finished
// builds of five units (5,000 units). Timed through the very functions the routes call
// (projectStock for GET /api/inventory/projection?days=90, lotGenealogy for the lot page),
// median of five calls after one warm-up. Targets: ≤ 200 ms each.
import { sql } from "kysely";
import { createDb, type Database } from "@/db/client";
import { lotGenealogy, projectStock } from "@/db/inventory/reads";
import { migrateToLatest } from "@/db/migrate";
import { seedDemoShop } from "@/db/seed";
import { freshDatabase } from "../fresh-database";
import { mulberry32 } from "@/lib/random";
import type { BenchRow, BenchSection } from "../types";

// one per test slot, so that two runs on a shared server do not drop each other's database
const DB_NAME = `hearth_bench_feedstock${process.env.HEARTH_TEST_SLOT ?? ""}`;
const BUILDS = Number(process.env.HEARTH_BENCH_FEEDSTOCK_BUILDS ?? 10_000);
const GENEALOGY_BUILDS = 1_000;
const UNITS_PER_GENEALOGY_BUILD = 5;
const PRINTERS = 120;
const HOUR = 3_600_000;

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];


async function chunked<T>(rows: T[], size: number, write: (chunk: T[]) => Promise<unknown>) {
  for (let i = 0; i < rows.length; i += size) await write(rows.slice(i, i + size));
}

async function fill(db: Database): Promise<string> {
  const rand = mulberry32(4242);
  await seedDemoShop(db);
  const materials = await db.selectFrom("materials").select(["id", "code"]).execute();
  const printers = await db
    .insertInto("printers")
    .values(Array.from({ length: PRINTERS }, (_, i) => ({ name: `Bench P${i}`, build_x_mm: 300, build_y_mm: 300, build_z_mm: 250, deposition_cm3_per_h: 25, layer_height_mm: 0.15, layer_overhead_s: 8 })))
    .returning("id")
    .execute();
  const order = await db.insertInto("orders").values({ code: "BENCH-FS", customer: "Bench customer", due_at: new Date(Date.now() + 120 * 24 * HOUR) }).returning("id").executeTakeFirstOrThrow();
  const parts = await db
    .insertInto("parts")
    .values(materials.flatMap((m, mi) => Array.from({ length: 25 }, (_, i) => ({
      order_id: order.id, part_number: `FS-${mi}-${i}`, name: "bench part", material_id: m.id, quantity: 1,
      nominal_x_mm: 20 + (i % 7) * 8, nominal_y_mm: 15 + (i % 5) * 9, nominal_z_mm: 10 + (i % 4) * 6, thickest_wall_mm: 4, volume_mm3: 1500 + i * 300,
    }))))
    .returning(["id", "material_id"])
    .execute();
  // scheduled builds: printer p takes one build a day, 20 h long, day d = k div printers
  const t0 = Math.ceil(Date.now() / HOUR) * HOUR + 2 * HOUR;
  const builds = Array.from({ length: BUILDS }, (_, k) => {
    const m = materials[k % materials.length];
    const start = new Date(t0 + Math.floor(k / PRINTERS) * 24 * HOUR * (90 / Math.ceil(BUILDS / PRINTERS)) + (k % 3) * HOUR);
    return { code: `BF-${k}`, material_id: m.id, printer_id: printers[k % PRINTERS].id, state: "scheduled" as const, starts_at: start, ends_at: new Date(start.getTime() + 20 * HOUR), est_minutes: 1200 };
  });
  const ids: { id: string; material_id: string }[] = [];
  await chunked(builds, 1000, async (c) => ids.push(...(await db.insertInto("builds").values(c).returning(["id", "material_id"]).execute())));
  const partsOf = (mat: string) => parts.filter((p) => p.material_id === mat);
  const units = ids.flatMap((b, k) => Array.from({ length: 1 + Math.floor(rand() * 3) }, (_, j) => {
    const ps = partsOf(b.material_id);
    return { part_id: ps[Math.floor(rand() * ps.length)].id, serial: `BFU-${k}-${j}`, state: "planned" as const, build_id: b.id };
  }));
  await chunked(units, 2000, (c) => db.insertInto("units").values(c).execute());
  // one lot behind 5,000 finished units
  const mat = materials[0];
  const lot = await db
    .insertInto("feedstock_lots")
    .values({ code: "FL-BENCH", material_id: mat.id, supplier: "Bench Powders", supplier_lot: "B-1", received_on: "2026-01-01", quantity_g: 9_000_000, remaining_g: 1_000_000, state: "released" })
    .returning("id")
    .executeTakeFirstOrThrow();
  const past = Date.now() - 400 * 24 * HOUR;
  const done = Array.from({ length: GENEALOGY_BUILDS }, (_, k) => {
    const start = new Date(past + k * 6 * HOUR);
    return { code: `BG-${k}`, material_id: mat.id, printer_id: printers[k % PRINTERS].id, state: "complete" as const, starts_at: start, ends_at: new Date(start.getTime() + 5 * HOUR), est_minutes: 300, feedstock_lot_id: lot.id };
  });
  const doneIds: string[] = [];
  await chunked(done, 1000, async (c) => doneIds.push(...(await db.insertInto("builds").values(c).returning("id").execute()).map((r) => r.id)));
  const matParts = partsOf(mat.id);
  await chunked(
    doneIds.flatMap((id, k) => Array.from({ length: UNITS_PER_GENEALOGY_BUILD }, (_, j) => ({ part_id: matParts[(k + j) % matParts.length].id, serial: `BGU-${k}-${j}`, state: "done" as const, build_id: id }))),
    2000,
    (c) => db.insertInto("units").values(c).execute(),
  );
  await chunked(doneIds, 2000, (c) => db.insertInto("feedstock_draws").values(c.map((id) => ({ lot_id: lot.id, build_id: id, estimated_g: 500, drawn_g: 500 }))).execute());
  await sql`analyze`.execute(db);
  return lot.id;
}

async function timed<T>(fn: () => Promise<T>, reps = 5): Promise<{ ms: number; value: T }> {
  let value = await fn(); // warm-up
  const times: number[] = [];
  for (let i = 0; i < reps; i++) {
    const t = performance.now();
    value = await fn();
    times.push(performance.now() - t);
  }
  return { ms: Math.round(median(times) * 10) / 10, value };
}

export const section: BenchSection = {
  name: "feedstock",
  async run(): Promise<BenchRow[]> {
    const { url } = await freshDatabase(DB_NAME);
    const { db } = createDb(url, 4);
    try {
      await migrateToLatest(db);
      const t = performance.now();
      const lotId = await fill(db);
      console.log(`feedstock bench: filled in ${Math.round(performance.now() - t)} ms`);
      const proj = await timed(() => projectStock(db, { days: 90 }));
      const scheduled = proj.value.materials.reduce((s, m) => s + m.projection.days.reduce((n, d) => n + d.builds.length, 0), 0);
      const gen = await timed(() => lotGenealogy(db, lotId));
      return [
        { section: "feedstock", name: `projected on hand, all materials, 90 days (${scheduled} scheduled builds)`, metric: "ms (median of 5)", value: proj.ms, target: "≤ 200", ok: proj.ms <= 200, detail: { materials: proj.value.materials.length } },
        { section: "feedstock", name: `genealogy of one lot (${gen.value.length} units)`, metric: "ms (median of 5)", value: gen.ms, target: "≤ 200", ok: gen.ms <= 200 },
      ];
    } finally {
      await db.destroy();
    }
  },
};
