// The worker tests' own world: a scratch database (migrated, with a small shop), a mail capture
// server on free ports, a pg-boss sender, and worker processes started and killed at will, so
// that the test run's global worker never touches what these tests look at.
import { spawn, type ChildProcess } from "node:child_process";
import { mkdtempSync } from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import PgBoss from "pg-boss";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { ALL_QUEUES } from "@/lib/jobs/queues";
import { sendAdvance } from "@/db/jobs/advance";
import type { AdvanceJob } from "@/lib/jobs/queues";
import type { Role } from "@/lib/auth/permissions";
import { startMailCapture } from "../../scripts/fakes/mail-capture";
import { scratchDatabase } from "../helpers/db";

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = net.createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const port = (srv.address() as net.AddressInfo).port;
      srv.close(() => resolve(port));
    });
  });
}

export type Capture = {
  smtpPort: number;
  apiUrl: string;
  messages: (to?: string) => Promise<{ id: string; to: string[]; subject: string; text: string; html: string; message_id: string | null }[]>;
  clear: () => Promise<void>;
  setDown: (down: boolean) => Promise<void>;
  close: () => Promise<void>;
};

export async function startCapture(): Promise<Capture> {
  const smtpPort = await freePort();
  const apiPort = await freePort();
  const dir = mkdtempSync(path.join(os.tmpdir(), "hearth-mail-"));
  const server = await startMailCapture({ smtpPort, apiPort, dir });
  const apiUrl = `http://127.0.0.1:${apiPort}`;
  return {
    smtpPort,
    apiUrl,
    messages: async (to) => {
      const res = await fetch(`${apiUrl}/messages${to ? `?to=${encodeURIComponent(to)}` : ""}`);
      return (await res.json()).messages;
    },
    clear: async () => {
      await fetch(`${apiUrl}/messages`, { method: "DELETE" });
    },
    setDown: async (down) => {
      await fetch(`${apiUrl}/switch?down=${down ? 1 : 0}`, { method: "POST" });
    },
    close: () => server.close(),
  };
}

export type Shop = {
  tag: string;
  users: Record<"technician" | "operator1" | "operator2" | "manager" | "machinist1" | "machinist2" | "admin", { id: string; email: string }>;
  material_id: string;
  profile_id: string;
  printer_ids: string[];
  station_id: string;
  furnace_ids: string[];
  order_id: string;
  part_id: string;
};

export type WorkerDb = { url: string; db: Database; shop: Shop; drop: () => Promise<void> };

/** A migrated scratch database with one shop: two operators, two machinists, one of each other role. */
export async function createWorkerDb(tag: string, opts: { drying_minutes?: number; printers?: number; furnaces?: number } = {}): Promise<WorkerDb> {
  const scratch = await scratchDatabase(tag);
  const { db } = createDb(scratch.url, 6);
  await migrateToLatest(db);
  const shop = await seedShop(db, tag, opts);
  return {
    url: scratch.url,
    db,
    shop,
    drop: async () => {
      await db.destroy();
      await scratch.drop();
    },
  };
}

export async function seedShop(db: Database, tag: string, opts: { drying_minutes?: number; printers?: number; furnaces?: number }): Promise<Shop> {
  await db.insertInto("shop_settings").values({ shop_name: `Test shop ${tag}`, time_zone: "Europe/Berlin", drying_minutes: opts.drying_minutes ?? 0 }).execute();
  const people: [keyof Shop["users"], Role][] = [
    ["technician", "technician"],
    ["operator1", "furnace_operator"],
    ["operator2", "furnace_operator"],
    ["manager", "manager"],
    ["machinist1", "machinist"],
    ["machinist2", "machinist"],
    ["admin", "admin"],
  ];
  const users = {} as Shop["users"];
  for (const [key, role] of people) {
    const email = `${key}.${tag}@kiln.test`;
    const row = await db
      .insertInto("users")
      .values({ email, name: `${key} ${tag}`, role, unit_pref: key === "machinist2" ? "in" : "mm" })
      .returning("id")
      .executeTakeFirstOrThrow();
    users[key] = { id: row.id, email };
  }
  const profile = await db
    .insertInto("sinter_profiles")
    .values({ code: `P-${tag}`, name: "test profile", atmosphere: "H₂ flowing", cool_rate_c_per_min: 10 })
    .returning("id")
    .executeTakeFirstOrThrow();
  await db.insertInto("sinter_profile_segments").values({ profile_id: profile.id, position: 0, rate_c_per_min: 5, setpoint_c: 1350, hold_min: 60 }).execute();
  const material = await db
    .insertInto("materials")
    .values({
      code: `M-${tag}`,
      name: "17-4 PH test",
      alloy_family: "stainless",
      shrink_xy: 0.15,
      shrink_z: 0.165,
      green_density_g_cm3: 5.05,
      sintered_density_g_cm3: 7.6,
      theoretical_density_g_cm3: 7.8,
      solids_loading: 0.6,
      wash_k_min_per_mm2: 30,
      min_mass_loss: 0.035,
      default_profile_id: profile.id,
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  const printer_ids: string[] = [];
  for (let i = 0; i < (opts.printers ?? 2); i++) {
    const p = await db
      .insertInto("printers")
      .values({ name: `Printer ${i} ${tag}`, build_x_mm: 300, build_y_mm: 220, build_z_mm: 180, deposition_cm3_per_h: 20 })
      .returning("id")
      .executeTakeFirstOrThrow();
    printer_ids.push(p.id);
  }
  const station = await db
    .insertInto("wash_stations")
    .values({ name: `Wash ${tag}`, solvent: "solvent", basket_x_mm: 400, basket_y_mm: 300, basket_z_mm: 200, capacity_units: 24, max_load_g: 12000 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const furnace_ids: string[] = [];
  for (let i = 0; i < (opts.furnaces ?? 1); i++) {
    const f = await db
      .insertInto("furnaces")
      .values({ name: `Kiln ${i} ${tag}`, tray_x_mm: 300, tray_y_mm: 250, tray_count: 3, usable_height_mm: 120, max_load_g: 15000, max_cool_rate_c_per_min: 8 })
      .returning("id")
      .executeTakeFirstOrThrow();
    furnace_ids.push(f.id);
  }
  const order = await db
    .insertInto("orders")
    .values({ code: `WO-${tag}`, customer: "Test customer", due_at: new Date(Date.now() + 7 * 86_400_000) })
    .returning("id")
    .executeTakeFirstOrThrow();
  const part = await db
    .insertInto("parts")
    .values({
      order_id: order.id,
      part_number: `KP-${tag}`,
      name: "pump bracket",
      material_id: material.id,
      quantity: 4,
      nominal_x_mm: 40,
      nominal_y_mm: 30,
      nominal_z_mm: 20,
      thickest_wall_mm: 4,
      stock_x_neg_mm: 0.3,
      stock_x_pos_mm: 0.3,
      stock_z_pos_mm: 0.5,
      finishing_notes: "Grind datum A flat; ream Ø6 holes.",
      target_ra_um: 0.8,
      tolerance_grade: "IT7",
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  return { tag, users, material_id: material.id, profile_id: profile.id, printer_ids, station_id: station.id, furnace_ids, order_id: order.id, part_id: part.id };
}

let serialSeq = 0;
const HOUR = 3_600_000;

async function insertUnits(db: Database, shop: Shop, n: number, values: Record<string, unknown>): Promise<string[]> {
  if (n === 0) return [];
  const rows = await db
    .insertInto("units")
    .values(Array.from({ length: n }, () => ({ part_id: shop.part_id, serial: `U-${shop.tag}-${++serialSeq}-${Math.random().toString(36).slice(2, 6)}`, ...values })))
    .returning("id")
    .execute();
  return rows.map((r) => r.id);
}

export type Booking = { id: string; version: number; ends_at: Date; unit_ids: string[] };

/** A scheduled build; `slot` keeps bookings on one printer from overlapping (one hour each). */
export async function insertBuild(db: Database, shop: Shop, o: { ends_at: Date; units?: number; printer?: number; slot?: number; state?: "scheduled" | "running"; failed?: boolean }): Promise<Booking> {
  const printer_id = shop.printer_ids[o.printer ?? 0];
  const ends_at = o.slot === undefined ? o.ends_at : new Date(o.ends_at.getTime() - o.slot * HOUR);
  const row = await db
    .insertInto("builds")
    .values({
      code: `B-${shop.tag}-${++serialSeq}`,
      material_id: shop.material_id,
      printer_id,
      state: o.state ?? "scheduled",
      starts_at: new Date(ends_at.getTime() - HOUR + 60_000),
      ends_at,
      failed: o.failed ?? false,
      failure_reason: o.failed ? "nozzle clog at layer 212" : null,
      scale_snapshot: JSON.stringify({ xy: 1.17647, z: 1.1976 }),
    })
    .returning(["id", "version", "ends_at"])
    .executeTakeFirstOrThrow();
  const unit_ids = await insertUnits(db, shop, o.units ?? 2, { state: o.state === "running" ? "printing" : "planned", build_id: row.id });
  return { id: row.id, version: row.version, ends_at: row.ends_at as Date, unit_ids };
}

export async function insertWash(
  db: Database,
  shop: Shop,
  o: { ends_at: Date; units: { green?: number; brown?: number; passed?: boolean }[]; slot?: number },
): Promise<Booking> {
  const ends_at = o.slot === undefined ? o.ends_at : new Date(o.ends_at.getTime() - o.slot * HOUR);
  const row = await db
    .insertInto("wash_batches")
    .values({ code: `W-${shop.tag}-${++serialSeq}`, wash_station_id: shop.station_id, state: "running", starts_at: new Date(ends_at.getTime() - HOUR + 60_000), ends_at })
    .returning(["id", "version", "ends_at"])
    .executeTakeFirstOrThrow();
  const unit_ids: string[] = [];
  for (const u of o.units) {
    const [id] = await insertUnits(db, shop, 1, { state: "washing", wash_batch_id: row.id, green_mass_g: u.green ?? null, brown_mass_g: u.brown ?? null, wash_passed: u.passed ?? null });
    unit_ids.push(id);
  }
  return { id: row.id, version: row.version, ends_at: row.ends_at as Date, unit_ids };
}

export async function insertRun(db: Database, shop: Shop, o: { ends_at: Date; units?: number; furnace?: number; slot?: number }): Promise<Booking> {
  const ends_at = o.slot === undefined ? o.ends_at : new Date(o.ends_at.getTime() - o.slot * HOUR);
  const row = await db
    .insertInto("furnace_runs")
    .values({
      code: `R-${shop.tag}-${++serialSeq}`,
      furnace_id: shop.furnace_ids[o.furnace ?? 0],
      profile_id: shop.profile_id,
      state: "running",
      starts_at: new Date(ends_at.getTime() - HOUR + 60_000),
      ends_at,
      cycle_minutes: 59,
    })
    .returning(["id", "version", "ends_at"])
    .executeTakeFirstOrThrow();
  const unit_ids = await insertUnits(db, shop, o.units ?? 3, { state: "sintering", furnace_run_id: row.id, green_mass_g: 50, brown_mass_g: 47.5 });
  return { id: row.id, version: row.version, ends_at: row.ends_at as Date, unit_ids };
}

/** The web app's side of the contract: pg-boss sending only, jobs joined to a transaction. */
export async function startSender(url: string): Promise<PgBoss> {
  const boss = new PgBoss({ connectionString: url, supervise: false, schedule: false, max: 2 });
  boss.on("error", () => {});
  await boss.start();
  for (const q of ALL_QUEUES) await boss.createQueue(q);
  return boss;
}

export async function sendJob(db: Database, boss: PgBoss, job: AdvanceJob): Promise<void> {
  await db.transaction().execute((trx) => sendAdvance(boss, trx, job));
}

export type WorkerProc = { child: ChildProcess; logs: string[]; exited: Promise<number | null>; kill: (signal?: NodeJS.Signals) => Promise<void> };

/**
 * A worker process as npm start runs it, but as one process (`node --import tsx`, not the
 * tsx wrapper) so that SIGKILL reaches the worker itself.
 */
export async function startWorker(url: string, capture: Capture, env: Record<string, string> = {}): Promise<WorkerProc> {
  const root = path.resolve(import.meta.dirname, "../..");
  const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "worker/index.ts")], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: url,
      SMTP_HOST: "127.0.0.1",
      SMTP_PORT: String(capture.smtpPort),
      MAIL_CAPTURE_URL: capture.apiUrl,
      APP_URL: "http://hearth.test",
      HEARTH_SWEEP_SECONDS: "1",
      HEARTH_MAIL_PUMP_SECONDS: "0.5",
      HEARTH_WORKER_POLL_SECONDS: "0.5",
      HEARTH_MAIL_BACKOFF_SECONDS: "0.5",
      HEARTH_MAIL_BACKOFF_MAX_SECONDS: "1",
      // A worker killed mid-send leaves its claimed messages to the next after this long.
      HEARTH_MAIL_LEASE_SECONDS: "15",
      HEARTH_WORKER_QUIET: "1",
      DB_POOL_MAX: "6",
      ...env,
    },
    stdio: ["ignore", "pipe", "pipe"],
  });
  const logs: string[] = [];
  let ready: () => void;
  const readyP = new Promise<void>((r) => (ready = r));
  const onData = (chunk: Buffer) => {
    const text = chunk.toString();
    logs.push(text);
    if (text.includes(" ready; queues:")) ready();
  };
  child.stdout?.on("data", onData);
  child.stderr?.on("data", onData);
  const exited = new Promise<number | null>((resolve) => child.on("exit", (code) => resolve(code)));
  const timeout = new Promise<never>((_, reject) => setTimeout(() => reject(new Error(`worker did not start:\n${logs.join("")}`)), 90_000));
  await Promise.race([readyP, timeout, exited.then(() => Promise.reject(new Error(`worker exited:\n${logs.join("")}`)))]);
  return {
    child,
    logs,
    exited,
    kill: async (signal = "SIGTERM") => {
      if (child.exitCode !== null || child.signalCode !== null) return;
      child.kill(signal);
      await exited;
    },
  };
}

export async function waitUntil<T>(what: string, fn: () => Promise<T | false | null | undefined>, timeoutMs = 30_000, stepMs = 200): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < deadline) {
    try {
      const v = await fn();
      if (v) return v;
    } catch (err) {
      last = err;
    }
    await new Promise((r) => setTimeout(r, stepMs));
  }
  throw new Error(`timed out waiting for ${what}${last ? `: ${String(last)}` : ""}`);
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Unit state events per unit: the proof that each transition happened once. */
export async function unitStateEvents(db: Database, unitIds: string[]) {
  if (!unitIds.length) return [];
  return db
    .selectFrom("events")
    .select(["entity_id", "from_state", "to_state", "actor_id", "reason"])
    .where("entity", "=", "unit")
    .where("kind", "=", "state")
    .where("entity_id", "in", unitIds)
    .orderBy("id")
    .execute();
}

/**
 * Many due builds at once (one insert for the builds, one for their units), laid on the
 * printers in one-hour slots going back from `ends_at` so that none overlap.
 */
export async function insertDueBuilds(db: Database, shop: Shop, n: number, o: { ends_at: Date; units?: number }): Promise<Booking[]> {
  const perUnit = o.units ?? 2;
  const P = shop.printer_ids.length;
  const seq = ++serialSeq;
  const rows = await db
    .insertInto("builds")
    .values(
      Array.from({ length: n }, (_, i) => {
        const ends_at = new Date(o.ends_at.getTime() - Math.floor(i / P) * HOUR);
        return {
          code: `B-${shop.tag}-${seq}-${i}`,
          material_id: shop.material_id,
          printer_id: shop.printer_ids[i % P],
          state: "scheduled" as const,
          starts_at: new Date(ends_at.getTime() - HOUR + 60_000),
          ends_at,
        };
      }),
    )
    .returning(["id", "version", "ends_at", "code"])
    .execute();
  const units = await db
    .insertInto("units")
    .values(rows.flatMap((b) => Array.from({ length: perUnit }, (_, k) => ({ part_id: shop.part_id, serial: `${b.code}-${k}`, state: "planned" as const, build_id: b.id }))))
    .returning(["id", "build_id"])
    .execute();
  const byBuild = new Map<string, string[]>();
  for (const u of units) byBuild.set(u.build_id!, [...(byBuild.get(u.build_id!) ?? []), u.id]);
  return rows.map((b) => ({ id: b.id, version: b.version, ends_at: b.ends_at as Date, unit_ids: byBuild.get(b.id) ?? [] }));
}

/** Each booking's advance job, sent the way the app sends it, all in one transaction. */
export async function sendJobs(db: Database, boss: PgBoss, entity: AdvanceJob["entity"], bookings: Booking[]): Promise<void> {
  await db.transaction().execute(async (trx) => {
    for (const b of bookings) await sendAdvance(boss, trx, { entity, id: b.id, version: b.version, due_at: b.ends_at.toISOString() });
  });
}
