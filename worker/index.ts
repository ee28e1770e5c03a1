import os from "node:os";
import PgBoss from "pg-boss";
import { sql } from "kysely";
import { getDb, closeDb } from "@/db/client";
import { getEnv } from "@/lib/env";
import { ALL_QUEUES, QUEUES } from "@/lib/jobs/queues";
import { handleGeometry } from "./handlers/geometry";
import { ensureQueues, startWorkerJobs } from "./jobs";
import { logJobs, trackFailures } from "./job-log";

const workerId = `${os.hostname()}:${process.pid}:${Date.now().toString(36)}`;
const BEAT_MS = 15_000;

async function beat(jobRan = false) {
  const db = getDb();
  await db
    .insertInto("worker_heartbeats")
    .values({ worker_id: workerId, host: os.hostname(), pid: process.pid, last_job_at: jobRan ? new Date() : null })
    .onConflict((oc) =>
      oc.column("worker_id").doUpdateSet({ beat_at: sql`now()`, ...(jobRan ? { last_job_at: sql`now()` } : {}) }),
    )
    .execute();
}

async function main() {
  // Signals are taken from the first moment: one that comes while the worker is still starting
  // (a supervisor stopping it early) waits for the start to finish, then stops it gracefully.
  let pendingSignal: string | null = null;
  let onSignal = (signal: string) => {
    pendingSignal ??= signal;
  };
  process.on("SIGTERM", () => onSignal("SIGTERM"));
  process.on("SIGINT", () => onSignal("SIGINT"));

  // Failed jobs stay in pgboss.job for a week so that /setup/jobs can show them.
  const boss = new PgBoss({ connectionString: getEnv().DATABASE_URL, max: 5, archiveFailedAfterSeconds: 7 * 24 * 3600 });
  boss.on("error", (err) => console.error("[worker] pg-boss error", err.message));
  trackFailures(boss);
  await boss.start();
  await ensureQueues(boss);

  await boss.work(QUEUES.geometry, { includeMetadata: true, batchSize: 1 }, logJobs(QUEUES.geometry, handleGeometry));
  await boss.work(
    QUEUES.heartbeat,
    logJobs(QUEUES.heartbeat, async () => {
      await beat(true);
    }),
  );
  // Cron in pg-boss is minute-grained; the heartbeat job proves the queue is being worked.
  await boss.schedule(QUEUES.heartbeat, "* * * * *", {}, { singletonKey: "heartbeat" });
  await boss.send(QUEUES.heartbeat, {});

  const stopJobs = await startWorkerJobs(boss, workerId);

  await beat();
  const timer = setInterval(() => beat().catch((err) => console.error("[worker] heartbeat failed", err.message)), BEAT_MS);
  console.log(`[worker] ${workerId} ready; queues: ${ALL_QUEUES.join(", ")}`);

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[worker] ${signal}: finishing current jobs`);
    clearInterval(timer);
    await stopJobs();
    await boss.stop({ graceful: true, timeout: 20_000 });
    await getDb().deleteFrom("worker_heartbeats").where("worker_id", "=", workerId).execute().catch(() => {});
    await closeDb();
    process.exit(0);
  };
  onSignal = (signal) => void stop(signal);
  if (pendingSignal) onSignal(pendingSignal);
}

main().catch((err) => {
  console.error("[worker] failed to start:", err);
  process.exit(1);
});
