import type PgBoss from "pg-boss";
import type { Database } from "@/db/client";
import { claimDelivery, recordAttempt, type ClaimedDelivery } from "@/db/webhooks/commands";
import { EVENT_ID_HEADER, EVENT_TYPE_HEADER, SIGNATURE_HEADER, retryDelaySeconds, signatureHeader } from "@/lib/integrations/webhook-signature";
import { QUEUES, webhookJobSchema } from "@/lib/jobs/queues";
import { mapLimit } from "./limit";

// Outgoing webhooks: each delivery is a job on the "deliver-webhook" pg-boss queue, written in the
// transaction that recorded the event (migrations/202612042233_webhook_jobs.sql). The handler
// claims the delivery, POSTs outside any transaction with a timeout, records the answer in a
// short transaction, and fails the job when the receiver did not take it, so that pg-boss retries
// it with its exponential back-off.

export type WebhookConfig = { timeoutMs: number; retryBaseSeconds: number; maxAttempts: number; batch: number; appUrl: string };

const num = (v: string | undefined, fallback: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : fallback);

export function webhookConfig(env: NodeJS.ProcessEnv = process.env): WebhookConfig {
  return {
    timeoutMs: num(env.HEARTH_WEBHOOK_TIMEOUT_MS, 10_000),
    retryBaseSeconds: Math.max(1, Math.round(num(env.HEARTH_WEBHOOK_RETRY_BASE_SECONDS, 30))),
    maxAttempts: Math.max(1, Math.round(num(env.HEARTH_WEBHOOK_MAX_ATTEMPTS, 20))),
    batch: Math.round(num(env.HEARTH_WEBHOOK_BATCH, 4)),
    appUrl: env.APP_URL ?? "http://127.0.0.1:3000",
  };
}

/**
 * The knobs as pg-boss queue options: MAX_ATTEMPTS tries are the first run and maxAttempts − 1
 * retries; RETRY_BASE_SECONDS is the back-off's base delay. A job still active a minute past the
 * POST's time limit belongs to a worker that died, and pg-boss hands it out again.
 */
export function webhookQueueOptions(cfg: WebhookConfig) {
  return {
    retryLimit: cfg.maxAttempts - 1,
    retryDelay: cfg.retryBaseSeconds,
    retryBackoff: true,
    expireInSeconds: Math.ceil(cfg.timeoutMs / 1000) + 60,
  };
}

/** The body as sent and signed: the event's id and type, when it happened, and its data. */
export function webhookBody(d: Pick<ClaimedDelivery, "event_id" | "type" | "created_at" | "payload">): string {
  return JSON.stringify({ id: d.event_id, type: d.type, created_at: new Date(d.created_at).toISOString(), data: d.payload });
}

async function post(d: ClaimedDelivery, cfg: WebhookConfig): Promise<{ status: number | null; error: string | null; ms: number }> {
  const body = webhookBody(d);
  const t0 = performance.now();
  try {
    const res = await fetch(d.url, {
      method: "POST",
      redirect: "manual",
      signal: AbortSignal.timeout(cfg.timeoutMs),
      headers: {
        "content-type": "application/json",
        "user-agent": "Hearth-Webhooks/1",
        [SIGNATURE_HEADER]: signatureHeader(d.secret, Math.floor(Date.now() / 1000), body),
        [EVENT_ID_HEADER]: d.event_id,
        [EVENT_TYPE_HEADER]: d.type,
      },
      body,
    });
    const text = res.ok ? "" : (await res.text().catch(() => "")).slice(0, 300);
    return { status: res.status, error: res.ok ? null : `HTTP ${res.status}${text ? `: ${text}` : ""}`, ms: performance.now() - t0 };
  } catch (err) {
    const e = err as Error & { cause?: { code?: string } };
    const why = e.name === "TimeoutError" ? `no answer within ${cfg.timeoutMs} ms` : `${e.cause?.code ?? e.name}: ${e.message}`;
    return { status: null, error: why, ms: performance.now() - t0 };
  }
}

export type WebhookTally = { delivered: number; retry: number; failed: number; skipped: number };

/**
 * The "deliver-webhook" handler. Each job is settled alone: a failed attempt fails its own job
 * (boss.fail), which pg-boss retries after its back-off or, on the last try, leaves failed.
 */
export function webhookHandler(db: Database, boss: PgBoss, cfg: WebhookConfig, opts: { quiet?: boolean } = {}) {
  return async (jobs: PgBoss.JobWithMetadata<unknown>[]) => {
    const tally: WebhookTally = { delivered: 0, retry: 0, failed: 0, skipped: 0 };
    await mapLimit(jobs, 4, async (job) => {
      const parsed = webhookJobSchema.safeParse(job.data);
      if (!parsed.success) {
        tally.failed++;
        await boss.fail(QUEUES.webhook, job.id, { message: `bad payload: ${parsed.error.issues[0]?.message ?? "invalid"}` });
        return;
      }
      const deliveryId = parsed.data.delivery_id;
      try {
        const d = await claimDelivery(db, deliveryId, job.id);
        if (!d) {
          // delivered already, given up, being sent by another job, or its endpoint is paused or off
          tally.skipped++;
          return;
        }
        const result = await post(d, cfg);
        const outcome = await recordAttempt(db, d, result, {
          lastTry: job.retryCount >= job.retryLimit,
          retryInSeconds: retryDelaySeconds(job.retryCount + 1, job.retryDelay),
          appUrl: cfg.appUrl,
        });
        tally[outcome]++;
        if (outcome !== "delivered") await boss.fail(QUEUES.webhook, job.id, { message: result.error ?? "not delivered", status: result.status, delivery_id: deliveryId });
      } catch (err) {
        tally.failed++;
        const message = err instanceof Error ? err.message : String(err);
        console.error(`[worker] webhook delivery ${deliveryId} failed: ${message}`);
        await boss.fail(QUEUES.webhook, job.id, { message, delivery_id: deliveryId });
      }
    });
    if (!opts.quiet && (tally.delivered || tally.retry || tally.failed)) {
      console.log(`[worker] webhooks: ${tally.delivered} delivered, ${tally.retry} to retry, ${tally.failed} given up or failed${tally.skipped ? `, ${tally.skipped} skipped` : ""}`);
    }
    return tally;
  };
}
