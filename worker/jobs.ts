import type PgBoss from "pg-boss";
import { getDb } from "@/db/client";
import { QUEUES } from "@/lib/jobs/queues";
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
 * The worker's own queues and timers: advancing bookings, sending mail, recomputing scale-ups,
 * delivering webhooks, the sweep and the outbox pass. Returns a stop function for a graceful shutdown.
 */
export async function startWorkerJobs(boss: PgBoss, workerId: string): Promise<() => Promise<void>> {
  const cfg = workerConfig();
  const db = getDb();
  const queueOptions = { retryBackoff: true, expireInSeconds: cfg.expireSeconds };
  await boss.updateQueue(QUEUES.advance, { name: QUEUES.advance, ...queueOptions, retryLimit: 10, retryDelay: 5 });
  await boss.updateQueue(QUEUES.sendMail, { name: QUEUES.sendMail, ...queueOptions, retryLimit: 3, retryDelay: 10 });
  await boss.updateQueue(QUEUES.scaleUp, { name: QUEUES.scaleUp, ...queueOptions, retryLimit: 5, retryDelay: 10 });

  const work = { batchSize: cfg.batchSize, pollingIntervalSeconds: cfg.pollSeconds };
  for (let i = 0; i < cfg.concurrency; i++) {
    await boss.work(QUEUES.advance, work, logJobs(QUEUES.advance, advanceHandler(db, boss, { quiet: cfg.quiet })));
    await boss.work(QUEUES.sendMail, work, logJobs(QUEUES.sendMail, sendMailHandler(db)));
  }
  await boss.work(QUEUES.scaleUp, { batchSize: 5, pollingIntervalSeconds: cfg.pollSeconds }, logJobs(QUEUES.scaleUp, scaleUpHandler(db)));

  // Webhook deliveries: pg-boss's retries with exponential back-off, set on the queue, because the
  // database writes these jobs itself and takes its retry settings from the queue row.
  const hooks = webhookConfig();
  await boss.updateQueue(QUEUES.webhook, { name: QUEUES.webhook, ...webhookQueueOptions(hooks) });
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
