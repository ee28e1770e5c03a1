// npm run bench -- --only worker
// 1,000 builds whose end has passed, each with its advance job sent the way the app sends it,
// worked off by real worker processes (node --import tsx worker/index.ts, default settings) on
// a database of their own, with the local mail capture server: once with one worker, once with
// two. Measured: seconds from starting the workers to the last transition committed (target
// ≤ 60 s with one worker), transitions per second, seconds until every message was delivered,
// and duplicates of any kind with two workers (target 0).
import { sql } from "kysely";
import { createDb, type Database } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { insertDueBuilds, seedShop, sendJobs, startCapture, startSender, startWorker, waitUntil, type Capture } from "../tests/worker/harness";
import type { BenchRow, BenchSection } from "./types";
import { freshDatabase } from "./fresh-database";
import { r1 } from "./stats";

const N = Number(process.env.HEARTH_BENCH_WORKER_N ?? 1000);
const UNITS_PER_BUILD = 2;

type Outcome = {
  workers: number;
  startupS: number;
  endToEndS: number;
  transitionsPerS: number;
  mailS: number;
  unitEvents: number;
  duplicateUnitEvents: number;
  duplicateBookingEvents: number;
  duplicateMessages: number;
  outboxRows: number;
  messages: number;
};

async function scenario(workers: number, capture: Capture): Promise<Outcome> {
  const { url, drop } = await freshDatabase(`hearth_bench_worker${workers}`);
  const { db } = createDb(url, 4);
  const procs: Awaited<ReturnType<typeof startWorker>>[] = [];
  try {
    await migrateToLatest(db);
    const shop = await seedShop(db, `bench${workers}`, { printers: 10 });
    const builds = await insertDueBuilds(db, shop, N, { ends_at: new Date(Date.now() - 60_000), units: UNITS_PER_BUILD });
    const boss = await startSender(url);
    await sendJobs(db, boss, "build", builds);
    await boss.stop({ graceful: false, close: true });
    await capture.clear();

    const done = async (d: Database) => (await sql<{ n: number }>`select count(*)::int as n from builds where state = 'complete'`.execute(d)).rows[0].n;
    const t0 = performance.now();
    // Shop defaults: ten connections, sweep every minute, poll every second, batches of 25, two pollers a queue.
    const env = { DB_POOL_MAX: "10", HEARTH_SWEEP_SECONDS: "60", HEARTH_MAIL_PUMP_SECONDS: "10", HEARTH_WORKER_POLL_SECONDS: "1", HEARTH_MAIL_BACKOFF_SECONDS: "15", HEARTH_MAIL_BACKOFF_MAX_SECONDS: "600" };
    procs.push(...(await Promise.all(Array.from({ length: workers }, () => startWorker(url, capture, env)))));
    const startupS = (performance.now() - t0) / 1000;
    await waitUntil("every build complete", async () => (await done(db)) === N, 180_000, 100);
    const endToEndS = (performance.now() - t0) / 1000;
    await waitUntil(
      "every message delivered",
      async () => (await sql<{ n: number }>`select count(*)::int as n from notification_outbox where status <> 'sent'`.execute(db)).rows[0].n === 0 && (await capture.messages()).length >= N,
      180_000,
      200,
    );
    const mailS = (performance.now() - t0) / 1000;
    // Let any second copy that was going to happen happen before counting.
    await new Promise((r) => setTimeout(r, 2000));

    const ev = await sql<{ n: number; d: number }>`select count(*)::int as n, count(distinct entity_id)::int as d from events where entity = 'unit' and kind = 'state'`.execute(db);
    const bev = await sql<{ n: number; d: number }>`select count(*)::int as n, count(distinct entity_id)::int as d from events where entity = 'build' and kind = 'state'`.execute(db);
    const outbox = await sql<{ n: number }>`select count(*)::int as n from notification_outbox`.execute(db);
    const messages = await capture.messages();
    return {
      workers,
      startupS,
      endToEndS,
      transitionsPerS: N / Math.max(0.001, endToEndS - startupS),
      mailS,
      unitEvents: ev.rows[0].n,
      duplicateUnitEvents: ev.rows[0].n - ev.rows[0].d,
      duplicateBookingEvents: bev.rows[0].n - bev.rows[0].d,
      duplicateMessages: messages.length - new Set(messages.map((m) => m.message_id)).size,
      outboxRows: outbox.rows[0].n,
      messages: messages.length,
    };
  } finally {
    await Promise.all(procs.map((p) => p.kill("SIGTERM")));
    await db.destroy();
    await drop();
  }
}

export const section: BenchSection = {
  name: "worker",
  run: async () => {
    const capture = await startCapture();
    const rows: BenchRow[] = [];
    try {
      for (const workers of [1, 2]) {
        let o: Outcome;
        try {
          o = await scenario(workers, capture);
        } catch (err) {
          // No PostgreSQL to work on (or a worker that would not start): say so in the table.
          const error = err instanceof Error ? err.message : String(err);
          rows.push({ section: "worker", name: `${N} due builds, ${workers} worker${workers === 1 ? "" : "s"}`, metric: "s end to end (spawn → last transition)", value: null, ...(workers === 1 ? { target: "≤ 60", ok: false } : {}), detail: { error } });
          continue;
        }
        const name = `${N} due builds, ${workers} worker${workers === 1 ? "" : "s"}`;
        const detail = { ...o, units: N * UNITS_PER_BUILD };
        const clean = o.duplicateUnitEvents === 0 && o.duplicateBookingEvents === 0 && o.duplicateMessages === 0 && o.outboxRows === N && o.messages === N && o.unitEvents === N * UNITS_PER_BUILD;
        rows.push(
          { section: "worker", name, metric: "s end to end (spawn → last transition)", value: r1(o.endToEndS), ...(workers === 1 ? { target: "≤ 60", ok: o.endToEndS <= 60 } : {}), detail },
          { section: "worker", name, metric: "transitions / s after start-up", value: r1(o.transitionsPerS) },
          { section: "worker", name, metric: "s until every message delivered", value: r1(o.mailS) },
          { section: "worker", name, metric: "duplicates (events, messages)", value: o.duplicateUnitEvents + o.duplicateBookingEvents + o.duplicateMessages, target: "0", ok: clean },
        );
      }
    } finally {
      await capture.close();
    }
    return rows;
  },
};
