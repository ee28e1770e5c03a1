import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { currentMigration } from "@/db/migrate";
import { countLiveWorkers, findNewestHeartbeat, pingDatabase } from "@/db/health/reads";
import { findLastSweep, listQueueStats } from "@/db/jobs/reads";
import { summarizeOutbox } from "@/db/outbox/reads";
import { checkSmtp } from "@/adapters/mail/transport";
import { checkBucket } from "@/adapters/storage/s3";
import { getCurrentUser } from "@/app/_server/session";
import { liveHub } from "@/app/_server/live-hub";
import { can } from "@/lib/auth/permissions";

export const dynamic = "force-dynamic";

type Check = { ok: boolean; [key: string]: unknown };

// A worker beats every 15 s; three missed beats means it is gone.
const WORKER_STALE_SECONDS = 45;
// The sweep runs every minute; five minutes without one means no worker is sweeping.
const SWEEP_STALE_SECONDS = 300;

// A load balancer's check must be answered whatever hangs behind it: each check gives up
// after this long and counts as failed.
const CHECK_TIMEOUT_MS = 4_000;

async function timed<T>(fn: () => Promise<T>): Promise<{ ok: true; ms: number; value: T } | { ok: false; ms: number; error: string }> {
  const started = performance.now();
  let timer: NodeJS.Timeout | undefined;
  try {
    const value = await Promise.race([
      fn(),
      new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new Error(`no answer within ${CHECK_TIMEOUT_MS} ms`)), CHECK_TIMEOUT_MS);
      }),
    ]);
    return { ok: true, ms: Math.round(performance.now() - started), value };
  } catch (err) {
    return { ok: false, ms: Math.round(performance.now() - started), error: err instanceof Error ? err.message : String(err) };
  } finally {
    clearTimeout(timer);
  }
}

/**
 * Who may read the checks themselves (worker ids, queue counts, migration names): a signed-in
 * admin. API tokens with a monitoring scope will be the second way in; their check goes here.
 */
async function mayReadHealthDetail(): Promise<boolean> {
  const viewer = await getCurrentUser().catch(() => null);
  return !!viewer && can(viewer.role, "jobs:read");
}

// GET /api/health – public: {status: "up" | "down"} (503 when down); an admin also gets every check's detail
export async function GET() {
  const db = getDb();
  const [database, migration, worker, smtp, s3, jobs] = await Promise.all([
    timed(() => pingDatabase(db)),
    timed(() => currentMigration(db)),
    timed(async () => ({ newest: await findNewestHeartbeat(db), live: await countLiveWorkers(db, WORKER_STALE_SECONDS) })),
    timed(checkSmtp),
    timed(checkBucket),
    timed(async () => ({ queues: await listQueueStats(db), sweep: await findLastSweep(db), outbox: await summarizeOutbox(db) })),
  ]);

  const checks: Record<string, Check> = {
    database: database.ok ? { ok: true, latency_ms: Math.round(database.value * 100) / 100 } : { ok: false, error: database.error },
    migrations: migration.ok
      ? { ok: migration.value.pending === 0, applied: migration.value.applied, pending: migration.value.pending }
      : { ok: false, error: migration.error },
    worker: worker.ok
      ? (() => {
          const beat = worker.value.newest?.beat_at;
          const age = beat ? Math.round((Date.now() - beat.getTime()) / 1000) : null;
          const jobAt = worker.value.newest?.last_job_at;
          return {
            ok: age !== null && age <= WORKER_STALE_SECONDS,
            heartbeat_age_s: age,
            heartbeat_job_age_s: jobAt ? Math.round((Date.now() - jobAt.getTime()) / 1000) : null,
            live_workers: worker.value.live,
          };
        })()
      : { ok: false, error: worker.error },
    smtp: smtp.ok ? { ok: true, ms: smtp.ms } : { ok: false, error: smtp.error },
    storage: s3.ok ? { ok: true, ms: s3.ms } : { ok: false, error: s3.error },
    jobs: jobs.ok
      ? (() => {
          const { queues, sweep, outbox } = jobs.value;
          const sweepAge = sweep?.finished_at ? Math.round((Date.now() - sweep.finished_at.getTime()) / 1000) : null;
          const waiting = queues.map((q) => q.oldest_waiting_s).filter((s): s is number => s !== null);
          return {
            ok: sweepAge === null || sweepAge <= SWEEP_STALE_SECONDS,
            queues: Object.fromEntries(queues.map((q) => [q.queue, { waiting: q.waiting, scheduled: q.scheduled, active: q.active, failed: q.failed }])),
            oldest_waiting_s: waiting.length ? Math.max(...waiting) : null,
            last_sweep: sweep
              ? { at: sweep.finished_at, age_s: sweepAge, worker_id: sweep.worker_id, advanced: sweep.advanced, mail_sent: sweep.mail_sent, had_errors: sweep.error !== null }
              : null,
            outbox: { pending: outbox.pending, failed: outbox.failed, oldest_pending_at: outbox.oldest_pending_at },
          };
        })()
      : { ok: false, error: jobs.error },
  };
  const ok = Object.values(checks).every((c) => c.ok);
  const status = ok ? "up" : "down";
  // The checks, and this process's live-update streams and LISTEN connection, for an admin only.
  const body = (await mayReadHealthDetail())
    ? { status, ok, checked_at: new Date().toISOString(), checks, live: { pid: process.pid, ...liveHub().detail() } }
    : { status };
  return NextResponse.json(body, { status: ok ? 200 : 503, headers: { "cache-control": "no-store", ...(ok ? {} : { "retry-after": "5" }) } });
}
