// The worker's tunables. Defaults suit a shop; the tests turn them down to see a sweep or a
// retry within seconds.

const num = (name: string, fallback: number, min: number) => {
  const raw = process.env[name];
  const v = raw === undefined || raw === "" ? NaN : Number(raw);
  return Number.isFinite(v) ? Math.max(min, v) : fallback;
};

export type WorkerConfig = {
  /** Seconds between sweeps (bookings whose end passed without their job, stale scale-ups, due mail). */
  sweepSeconds: number;
  /** Seconds between outbox passes that retry due messages. */
  mailPumpSeconds: number;
  /** pg-boss polling interval per queue, seconds (pg-boss allows 0.5 at the least). */
  pollSeconds: number;
  /** Jobs fetched at once per poller. */
  batchSize: number;
  /** Pollers per queue in this process. */
  concurrency: number;
  /** An active job of a worker that died is handed out again after this many seconds. */
  expireSeconds: number;
  /** Most bookings one sweep advances. */
  sweepLimit: number;
  /** Seconds between passes that delete stored objects no files row names. */
  orphanSweepSeconds: number;
  /** An object younger than this may belong to an upload still in progress. */
  orphanMinAgeSeconds: number;
  /** Seconds between passes that look for orders that became late (the order.late event). */
  lateOrderSeconds: number;
  /** Seconds between passes that prune the activity log past its retention (daily). */
  activityPruneSeconds: number;
  quiet: boolean;
};

export function workerConfig(): WorkerConfig {
  const sweepSeconds = num("HEARTH_SWEEP_SECONDS", 60, 0.2);
  return {
    sweepSeconds,
    mailPumpSeconds: num("HEARTH_MAIL_PUMP_SECONDS", Math.min(10, sweepSeconds), 0.2),
    pollSeconds: num("HEARTH_WORKER_POLL_SECONDS", 1, 0.5),
    batchSize: Math.round(num("HEARTH_WORKER_BATCH", 25, 1)),
    concurrency: Math.round(num("HEARTH_WORKER_CONCURRENCY", 2, 1)),
    expireSeconds: Math.round(num("HEARTH_JOB_EXPIRE_SECONDS", 300, 5)),
    sweepLimit: Math.round(num("HEARTH_SWEEP_LIMIT", 500, 1)),
    orphanSweepSeconds: num("HEARTH_ORPHAN_SWEEP_SECONDS", 3600, 1),
    orphanMinAgeSeconds: num("HEARTH_ORPHAN_MIN_AGE_SECONDS", 3600, 0),
    lateOrderSeconds: num("HEARTH_LATE_ORDER_SECONDS", 60, 0.2),
    activityPruneSeconds: num("HEARTH_ACTIVITY_PRUNE_SECONDS", 86_400, 1),
    quiet: process.env.HEARTH_WORKER_QUIET === "1",
  };
}
