import type PgBoss from "pg-boss";
import { getDb } from "@/db/client";
import { ALL_QUEUES, QUEUES, type QueueName } from "@/lib/jobs/queues";
import { workerConfig } from "./config";
import { advanceHandler } from "./handlers/advance";
import { scaleUpHandler } from "./handlers/scale-up";
import { drainOutbox, sendMailHandler } from "./handlers/send-mail";
import { runSweep } from "./sweep";
import { webhookConfig, webhookHandler, webhookQueueOptions } from "./webhooks";
import { sendUnqueuedDeliveries } from "@/db/jobs/webhooks";
import { logJobs } from "./job-log";
import { sweepOrphanObjects } from "./orphans";
import { recordLateOrders } from "@/db/orders/late";
import { pruneActivity } from "@/db/activity/commands";

/** Runs `fn` every `seconds`, never two at once; resolves the returned stop() when the last run ends. */
function every(seconds: number, name: string, fn: () => Promise<void>) {
  let running: Promise<void> | null = null;
  let stopped = false;
  const tick = () => {
    if (stopped || running) return;
    running = fn()
      .catch((err) => console.error(`[worker] ${name} failed:`, err instanceof Error ? err.message : err))
      .finally(() => {
        running = null;
      });
  };
  const timer = setInterval(tick, seconds * 1000);
  tick();
  return async () => {
    stopped = true;
    clearInterval(timer);
    await running;
  };
}

/**
 * Retry and expiry settings per queue (queues not listed keep pg-boss's defaults). Webhook
 * deliveries get pg-boss's retries with exponential back-off on the queue row, because the database
 * writes those jobs itself and takes its retry settings from that row.
 */
export function queueSettings(): Partial<Record<QueueName, Omit<PgBoss.Queue, "name">>> {
  const cfg = workerConfig();
  const base = { retryBackoff: true, expireInSeconds: cfg.expireSeconds };
  return {
    [QUEUES.advance]: { ...base, retryLimit: 10, retryDelay: 5 },
    [QUEUES.sendMail]: { ...base, retryLimit: 3, retryDelay: 10 },
    [QUEUES.scaleUp]: { ...base, retryLimit: 5, retryDelay: 10 },
    [QUEUES.webhook]: webhookQueueOptions(webhookConfig()),
  };
}

/**
 * Creates every queue with its settings in the same step, then applies the settings again to a
 * queue that already existed (they may have changed since). Creating first and setting later left
 * a moment on a fresh database when the webhook queue existed with no retries, and a delivery the
 * database queued then would have been tried once.
 */
export async function ensureQueues(boss: PgBoss): Promise<void> {
  const settings = queueSettings();
  for (const name of ALL_QUEUES) {
    const s = settings[name];
    await boss.createQueue(name, s ? { name, ...s } : undefined);
    if (s) await boss.updateQueue(name, { name, ...s });
  }
}

/**
 * The worker's own queues and timers: advancing bookings, sending mail, recomputing scale-ups,
 * delivering webhooks, the sweep and the outbox pass. Returns a stop function for a graceful shutdown.
 */
export async function startWorkerJobs(boss: PgBoss, workerId: string): Promise<() => Promise<void>> {
  const cfg = workerConfig();
  const db = getDb();

  const work = { batchSize: cfg.batchSize, pollingIntervalSeconds: cfg.pollSeconds };
  for (let i = 0; i < cfg.concurrency; i++) {
    await boss.work(QUEUES.advance, work, logJobs(QUEUES.advance, advanceHandler(db, boss, { quiet: cfg.quiet })));
    await boss.work(QUEUES.sendMail, work, logJobs(QUEUES.sendMail, sendMailHandler(db)));
  }
  await boss.work(QUEUES.scaleUp, { batchSize: 5, pollingIntervalSeconds: cfg.pollSeconds }, logJobs(QUEUES.scaleUp, scaleUpHandler(db)));

  const hooks = webhookConfig();
  for (let i = 0; i < cfg.concurrency; i++) {
    await boss.work(
      QUEUES.webhook,
      { batchSize: hooks.batch, includeMetadata: true, pollingIntervalSeconds: cfg.pollSeconds },
      logJobs(QUEUES.webhook, webhookHandler(db, boss, hooks, { quiet: cfg.quiet })),
    );
  }

  const stopSweep = every(cfg.sweepSeconds, "sweep", async () => {
    const r = await runSweep(db, boss, workerId, { limit: cfg.sweepLimit });
    if (!cfg.quiet && (r.advanced || r.rescaled || r.mail_sent || r.errors.length)) {
      console.log(`[worker] sweep: ${r.advanced} advanced, ${r.rescaled} rescaled, ${r.mail_sent} mail sent in ${r.ms} ms${r.errors.length ? `; errors: ${r.errors.join("; ")}` : ""}`);
    }
  });
  const stopPump = every(cfg.mailPumpSeconds, "outbox", async () => {
    await drainOutbox(db, 200);
  });
  // Deliveries written while the webhook queue did not exist yet (a fresh database before its
  // first worker; the database warned) get their jobs now, and at each sweep after.
  const stopUnqueued = every(cfg.sweepSeconds, "webhook jobs", async () => {
    const n = await sendUnqueuedDeliveries(db, boss);
    if (n) console.log(`[worker] webhooks: sent jobs for ${n} deliveries written before the queue existed`);
  });
  const stopOrphans = every(cfg.orphanSweepSeconds, "orphan sweep", async () => {
    const r = await sweepOrphanObjects(db, { minAgeSeconds: cfg.orphanMinAgeSeconds });
    if (r.deleted.length) console.log(`[worker] orphan sweep: deleted ${r.deleted.length} of ${r.listed} stored objects that no file names`);
  });
  const stopLate = every(cfg.lateOrderSeconds, "late orders", async () => {
    const r = await recordLateOrders(db);
    if (!cfg.quiet && r.noticed.length) console.log(`[worker] late orders: ${r.noticed.length} became late`);
  });
  const stopPrune = every(cfg.activityPruneSeconds, "activity retention", async () => {
    const r = await pruneActivity(db);
    if (r.deleted) console.log(`[worker] activity retention: deleted ${r.deleted} events older than ${r.retention_days} days`);
  });
  console.log(
    `[worker] sweep every ${cfg.sweepSeconds} s, outbox every ${cfg.mailPumpSeconds} s, polling ${cfg.pollSeconds} s, batch ${cfg.batchSize} × ${cfg.concurrency}`,
  );
  return async () => {
    await Promise.all([stopSweep(), stopPump(), stopUnqueued(), stopOrphans(), stopLate(), stopPrune()]);
  };
}
