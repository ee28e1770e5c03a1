import type { Executor } from "@/db/users/reads";

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/** Endpoints for the admin, newest first; never the secret. */
export async function listWebhookEndpoints(db: Executor) {
  const rows = await db
    .selectFrom("webhook_endpoints as e")
    .select((eb) => [
      "e.id", "e.url", "e.description", "e.events", "e.active", "e.paused_at", "e.failing_since", "e.created_at", "e.version",
      eb.selectFrom("webhook_deliveries as d").whereRef("d.endpoint_id", "=", "e.id").where("d.state", "in", ["pending", "sending"]).select((x) => x.fn.countAll<string>().as("n")).as("waiting"),
      eb.selectFrom("webhook_deliveries as d").whereRef("d.endpoint_id", "=", "e.id").where("d.state", "=", "failed").select((x) => x.fn.countAll<string>().as("n")).as("failed"),
    ])
    .orderBy("e.created_at", "desc")
    .execute();
  return rows.map((r) => ({ ...r, paused_at: iso(r.paused_at), failing_since: iso(r.failing_since), created_at: r.created_at.toISOString(), waiting: Number(r.waiting ?? 0), failed: Number(r.failed ?? 0) }));
}
export type WebhookEndpointRow = Awaited<ReturnType<typeof listWebhookEndpoints>>[number];

/** The delivery log of one endpoint (or all), newest first, with each attempt's answer. */
export async function listWebhookDeliveries(db: Executor, opts: { endpointId?: string; limit?: number } = {}) {
  let q = db
    .selectFrom("webhook_deliveries as d")
    .innerJoin("webhook_events as ev", "ev.id", "d.event_id")
    .select(["d.id", "d.endpoint_id", "d.event_id", "ev.type", "ev.entity", "ev.entity_id", "d.state", "d.attempts", "d.last_status", "d.last_error", "d.next_attempt_at", "d.delivered_at", "d.created_at"])
    .orderBy("d.created_at", "desc")
    .limit(opts.limit ?? 100);
  if (opts.endpointId) q = q.where("d.endpoint_id", "=", opts.endpointId);
  const rows = await q.execute();
  return rows.map((r) => ({ ...r, next_attempt_at: r.next_attempt_at.toISOString(), delivered_at: iso(r.delivered_at), created_at: r.created_at.toISOString() }));
}
export type WebhookDeliveryRow = Awaited<ReturnType<typeof listWebhookDeliveries>>[number];
