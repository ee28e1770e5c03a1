// npm run bench -- --only batches
// "Suggest batches" for 1,000 waiting brown units, timed through proposeBatches — the very
// function POST /api/batches/suggest calls — against a database of its own
// (hearth_bench_batches): the demo shop, its furnaces replaced by the three furnaces of the
// planning-instance benchmark, and the 1,000-unit furnace mixes of that benchmark
// (bench/generate-instances.ts, seeds 1–5) written in as real orders, parts and brown units.
// Server time is the whole call: loading the units and the shop, projecting each unit, the
// furnace planner (tray packer + booking), and storing the proposal. Targets: < 1 s and
// runs / lower bound ≤ 1.02 (mean over the seeds, as the packing section reports it). The search
// runs on a compute thread, as in the app's web server (db/compute/threads.ts), so the time
// includes handing the units to the thread and the plan back.
import { sql } from "kysely";
import { createDb, type Database } from "@/db/client";
import { proposeBatches } from "@/db/batches/commands";
import { startComputeThreads } from "@/db/compute/threads";
import { migrateToLatest } from "@/db/migrate";
import { seedDemoShop } from "@/db/seed";
import { BENCH_FURNACES, furnaceMixInstance } from "./generate-instances";
import type { BenchRow, BenchSection } from "./types";
import { freshDatabase } from "./fresh-database";
import { median } from "./stats";

const DB_NAME = "hearth_bench_batches";
const SEEDS = (process.env.HEARTH_BENCH_BATCHES_SEEDS ?? "1,2,3,4,5").split(",").map(Number);
const N_UNITS = Number(process.env.HEARTH_BENCH_BATCHES_UNITS ?? 1000);
const REPEATS = 3;

const round = (x: number, d = 3) => Math.round(x * 10 ** d) / 10 ** d;

/** The bench furnaces in place of the demo's, with the profiles of the same codes. */
async function setUpShop(db: Database): Promise<Map<string, string>> {
  await seedDemoShop(db);
  // Only the bench's units wait for a furnace.
  await db.deleteFrom("units").where("state", "in", ["brown", "washing"]).execute();
  await db.updateTable("furnaces").set({ active: false }).execute();
  const profiles = await db.selectFrom("sinter_profiles").select(["id", "code"]).execute();
  const profileId = new Map(profiles.map((p) => [p.code, p.id]));
  for (const f of BENCH_FURNACES) {
    const row = await db
      .insertInto("furnaces")
      .values({ name: `Bench ${f.id}`, tray_x_mm: f.tray_mm[0], tray_y_mm: f.tray_mm[1], tray_count: f.tray_count, usable_height_mm: f.usable_height_mm, max_load_g: f.max_load_g, max_cool_rate_c_per_min: 10 })
      .returning("id")
      .executeTakeFirstOrThrow();
    await db.insertInto("furnace_profiles").values(f.profiles.map((code) => ({ furnace_id: row.id, profile_id: profileId.get(code)! }))).execute();
  }
  const materials = await db.selectFrom("materials").innerJoin("sinter_profiles as p", "p.id", "materials.default_profile_id").select(["materials.id", "p.code"]).execute();
  return new Map(materials.map((m) => [m.code, m.id]));
}

/** One furnace mix as orders, parts and brown units; returns the order ids to clear afterwards. */
async function writeUnits(db: Database, seed: number, materialByProfile: Map<string, string>): Promise<string[]> {
  const inst = furnaceMixInstance(seed, N_UNITS);
  const orders = await db
    .insertInto("orders")
    .values(inst.units.map((u) => ({ code: `BB${seed}-${u.id}`, customer: "Bench", due_at: new Date(u.due), priority: 3 })))
    .returning(["id", "code"])
    .execute();
  const orderId = new Map(orders.map((o) => [o.code, o.id]));
  const parts = await db
    .insertInto("parts")
    .values(
      inst.units.map((u) => ({
        order_id: orderId.get(`BB${seed}-${u.id}`)!, part_number: u.id, name: "bench part", material_id: materialByProfile.get(u.profile)!, quantity: 1,
        nominal_x_mm: u.footprint_mm[0] * 0.85, nominal_y_mm: u.footprint_mm[1] * 0.85, nominal_z_mm: u.height_mm * 0.85, thickest_wall_mm: 4,
        green_x_mm: u.footprint_mm[0], green_y_mm: u.footprint_mm[1], green_z_mm: u.height_mm,
      })),
    )
    .returning(["id", "part_number"])
    .execute();
  const partId = new Map(parts.map((p) => [p.part_number, p.id]));
  await db
    .insertInto("units")
    .values(
      inst.units.map((u) => ({
        part_id: partId.get(u.id)!, serial: `BB${seed}-${u.id}-01`, state: "brown" as const,
        brown_mass_g: Math.max(0.1, u.mass_g), green_mass_g: Math.max(0.1, Math.round((u.mass_g / 0.95) * 10) / 10), wash_passed: true,
      })),
    )
    .execute();
  await sql`analyze`.execute(db);
  return orders.map((o) => o.id);
}

export async function runBatchesBench(): Promise<BenchRow[]> {
  const { url } = await freshDatabase(DB_NAME);
  const { db } = createDb(url, 4);
  const rows: BenchRow[] = [];
  try {
    await migrateToLatest(db);
    startComputeThreads();
    const materialByProfile = await setUpShop(db);
    const ratios: number[] = [];
    const times: number[] = [];
    for (const seed of SEEDS) {
      const orderIds = await writeUnits(db, seed, materialByProfile);
      const samples: number[] = [];
      let last: Awaited<ReturnType<typeof proposeBatches>> | null = null;
      // One call to warm the query plans and the JIT, then the median of the measured ones.
      await proposeBatches(db, { wash: false, furnace: true, horizon_hours: 48 }, null);
      for (let i = 0; i < REPEATS; i++) {
        const t0 = performance.now();
        last = await proposeBatches(db, { wash: false, furnace: true, horizon_hours: 48 }, null);
        samples.push(performance.now() - t0);
      }
      const m = last!.metrics;
      const ms = round(median(samples), 1);
      const ratio = m.lower_bound > 0 ? round(m.furnace_runs / m.lower_bound) : 1;
      ratios.push(ratio);
      times.push(ms);
      rows.push({
        section: "batches",
        name: `suggest furnace runs s${seed} (${m.furnace_units} of ${N_UNITS} units)`,
        metric: "runs / lower bound",
        value: ratio,
        ms,
        detail: { timing: last!.timing, runs: m.furnace_runs, lower_bound: m.lower_bound, unplaced: last!.unplaced.length, planner_ms: m.pack_ms, server_ms_samples: samples.map((s) => round(s, 1)), late_units: m.late_units },
      });
      await db.deleteFrom("batch_proposals").execute();
      await db.deleteFrom("orders").where("id", "in", orderIds).execute();
    }
    const mean = round(ratios.reduce((s, x) => s + x, 0) / ratios.length);
    rows.push({ section: "batches", name: `suggest furnace runs, mean of ${SEEDS.length} seeds`, metric: "runs / lower bound", value: mean, target: "≤ 1.02", ok: mean <= 1.02 });
    const slowest = Math.max(...times);
    rows.push({ section: "batches", name: `suggest furnace runs, slowest seed (${N_UNITS} units)`, metric: "server ms", value: slowest, target: "< 1000", ok: slowest < 1000 });
  } finally {
    await db.destroy();
  }
  return rows;
}

export const section: BenchSection = { name: "batches", run: runBatchesBench };
