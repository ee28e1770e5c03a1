import type { Database } from "@/db/client";
import { claimDueDeliveries, recordAttempt, type ClaimedDelivery } from "@/db/webhooks/commands";
import { EVENT_ID_HEADER, EVENT_TYPE_HEADER, SIGNATURE_HEADER, signatureHeader } from "@/lib/integrations/webhook-signature";
import { mapLimit } from "./limit";

// Outgoing webhooks: the worker claims due deliveries (db/webhooks/commands.ts) and POSTs each
// outside any transaction, with a timeout, then records the answer in a short transaction.

export type WebhookConfig = { timeoutMs: number; retryBaseSeconds: number; maxAttempts: number; leaseSeconds: number; batch: number; appUrl: string };

const num = (v: string | undefined, fallback: number) => (v && Number.isFinite(Number(v)) && Number(v) > 0 ? Number(v) : fallback);

export function webhookConfig(env: NodeJS.ProcessEnv = process.env): WebhookConfig {
  return {
    timeoutMs: num(env.HEARTH_WEBHOOK_TIMEOUT_MS, 10_000),
    retryBaseSeconds: num(env.HEARTH_WEBHOOK_RETRY_BASE_SECONDS, 30),
    maxAttempts: num(env.HEARTH_WEBHOOK_MAX_ATTEMPTS, 20),
    leaseSeconds: num(env.HEARTH_WEBHOOK_LEASE_SECONDS, 60),
    batch: num(env.HEARTH_WEBHOOK_BATCH, 20),
    appUrl: env.APP_URL ?? "http://127.0.0.1:3000",
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

/** One pass: claim, send, record. Returns what happened, for the log and the tests. */
export async function deliverDueWebhooks(db: Database, cfg: WebhookConfig = webhookConfig()) {
  const claimed = await claimDueDeliveries(db, cfg.batch, cfg.leaseSeconds);
  const out = { delivered: 0, retry: 0, failed: 0 };
  await mapLimit(claimed, 4, async (d) => {
    const result = await post(d, cfg);
    out[await recordAttempt(db, d, result, cfg)]++;
  });
  return out;
}
