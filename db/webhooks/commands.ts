import { sql } from "kysely";
import type { Database } from "@/db/client";
import { insertOutboxRows } from "@/db/outbox/commands";
import { AppError } from "@/lib/errors";
import { escapeHtml } from "@/lib/integrations/html";
import { PAUSE_AFTER_FAILING_MS, newWebhookSecret, retryDelaySeconds, type CreateWebhookInput } from "@/lib/integrations/webhook-signature";

/** Registers an endpoint; the signing secret is returned this once. */
export async function insertWebhookEndpoint(db: Database, actorId: string, input: CreateWebhookInput) {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .insertInto("webhook_endpoints")
      .values({ url: input.url, description: input.description, events: input.events, secret: newWebhookSecret(), created_by: actorId })
      .returning(["id", "url", "description", "events", "secret", "version"])
      .executeTakeFirstOrThrow();
    await trx.insertInto("events").values({ entity: "webhook_endpoint", entity_id: row.id, kind: "created", actor_id: actorId, data: JSON.stringify({ url: row.url, events: row.events }) }).execute();
    return row;
  });
}

/** Turns an endpoint on or off, changes its events, or resumes it after a pause. */
export async function updateWebhookEndpoint(db: Database, actorId: string, id: string, input: { version: number; active?: boolean; resume?: true; events?: string[] }) {
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("webhook_endpoints")
      .set({
        ...(input.active !== undefined ? { active: input.active } : {}),
        ...(input.events ? { events: input.events } : {}),
        ...(input.resume ? { paused_at: null, failing_since: null, pause_mailed_at: null } : {}),
        version: sql`version + 1`,
      })
      .where("id", "=", id)
      .where("version", "=", input.version)
      .returning(["id", "active", "events", "paused_at", "version"])
      .executeTakeFirst();
    if (!row) {
      const exists = await trx.selectFrom("webhook_endpoints").select("version").where("id", "=", id).executeTakeFirst();
      if (!exists) throw new AppError("not_found", "No such webhook endpoint.");
      throw new AppError("conflict", "Someone else changed this endpoint; reload and try again.", undefined, { current_version: exists.version });
    }
    // Resuming puts the deliveries that gave up while it was paused back in line.
    if (input.resume) await trx.updateTable("webhook_deliveries").set({ state: "pending", next_attempt_at: sql`now()` }).where("endpoint_id", "=", id).where("state", "=", "failed").execute();
    await trx.insertInto("events").values({ entity: "webhook_endpoint", entity_id: id, kind: input.resume ? "resumed" : "edit", actor_id: actorId, data: JSON.stringify(input) }).execute();
    return { ...row, paused_at: row.paused_at?.toISOString() ?? null };
  });
}

/** Sends one delivery again as soon as the worker gets to it (same event id, fresh signature). */
export async function redeliverWebhook(db: Database, deliveryId: string) {
  const row = await db
    .updateTable("webhook_deliveries")
    .set({ state: "pending", next_attempt_at: sql`now()`, lease_until: null })
    .where("id", "=", deliveryId)
    .where("state", "<>", "sending")
    .returning(["id", "state"])
    .executeTakeFirst();
  if (!row) {
    const exists = await db.selectFrom("webhook_deliveries").select("state").where("id", "=", deliveryId).executeTakeFirst();
    if (!exists) throw new AppError("not_found", "No such delivery.");
    throw new AppError("conflict", "This delivery is being sent right now.");
  }
  return row;
}

export type ClaimedDelivery = { id: string; attempts: number; event_id: string; type: string; payload: unknown; created_at: Date; url: string; secret: string; endpoint_id: string };

/**
 * Claims due deliveries for this worker: FOR UPDATE SKIP LOCKED and a lease, so two workers
 * never take the same row, and a worker that dies mid-send leaves a row another picks up when
 * the lease runs out. Deliveries of paused or inactive endpoints wait.
 */
export async function claimDueDeliveries(db: Database, limit: number, leaseSeconds: number): Promise<ClaimedDelivery[]> {
  const { rows } = await sql<ClaimedDelivery>`
    with due as (
      select d.id from webhook_deliveries d
      join webhook_endpoints e on e.id = d.endpoint_id
      where e.active and e.paused_at is null
        and ((d.state = 'pending' and d.next_attempt_at <= now()) or (d.state = 'sending' and d.lease_until < now()))
      order by d.next_attempt_at
      limit ${limit}
      for update of d skip locked
    )
    update webhook_deliveries d
      set state = 'sending', attempts = d.attempts + 1, lease_until = now() + make_interval(secs => ${leaseSeconds})
    from due, webhook_events ev, webhook_endpoints e
    where d.id = due.id and ev.id = d.event_id and e.id = d.endpoint_id
    returning d.id, d.attempts, d.event_id, ev.type, ev.payload, ev.created_at, e.url, e.secret, e.id as endpoint_id`.execute(db);
  return rows;
}

/**
 * Records one attempt's answer. Success: delivered, the endpoint's failure streak ends. Failure:
 * back in line after a doubling wait, or given up after maxAttempts; an endpoint that has failed
 * for a day is paused and its creator (or, without one, every admin) is mailed once.
 */
export async function recordAttempt(
  db: Database,
  d: ClaimedDelivery,
  result: { status: number | null; error: string | null; ms: number },
  opts: { retryBaseSeconds: number; maxAttempts: number; appUrl: string },
): Promise<"delivered" | "retry" | "failed"> {
  const ok = result.status !== null && result.status >= 200 && result.status < 300;
  return db.transaction().execute(async (trx) => {
    await trx.insertInto("webhook_attempts").values({ delivery_id: d.id, status: result.status, error: result.error?.slice(0, 500) ?? null, duration_ms: Math.round(result.ms) }).execute();
    if (ok) {
      await trx.updateTable("webhook_deliveries").set({ state: "delivered", delivered_at: sql`now()`, last_status: result.status, last_error: null, lease_until: null }).where("id", "=", d.id).execute();
      await trx.updateTable("webhook_endpoints").set({ failing_since: null }).where("id", "=", d.endpoint_id).where("failing_since", "is not", null).execute();
      return "delivered";
    }
    const give_up = d.attempts >= opts.maxAttempts;
    await trx
      .updateTable("webhook_deliveries")
      .set({
        state: give_up ? "failed" : "pending",
        last_status: result.status,
        last_error: result.error?.slice(0, 500) ?? null,
        lease_until: null,
        next_attempt_at: sql`now() + make_interval(secs => ${retryDelaySeconds(d.attempts, opts.retryBaseSeconds)})`,
      })
      .where("id", "=", d.id)
      .execute();
    const ep = await trx
      .updateTable("webhook_endpoints")
      .set({ failing_since: sql`coalesce(failing_since, now())` })
      .where("id", "=", d.endpoint_id)
      .returning(["id", "url", "failing_since", "paused_at", "pause_mailed_at", "created_by"])
      .executeTakeFirstOrThrow();
    if (!ep.paused_at && ep.failing_since && Date.now() - ep.failing_since.getTime() >= PAUSE_AFTER_FAILING_MS) {
      await trx.updateTable("webhook_endpoints").set({ paused_at: sql`now()`, pause_mailed_at: sql`now()` }).where("id", "=", ep.id).execute();
      if (!ep.pause_mailed_at) {
        let q = trx.selectFrom("users").select(["id", "email", "name"]).where("active", "=", true).where("role", "=", "admin");
        if (ep.created_by) q = q.where("id", "=", ep.created_by);
        const admins = await q.execute();
        const link = new URL("/setup/webhooks", opts.appUrl).toString();
        const text = `Deliveries to ${ep.url} have failed since ${ep.failing_since.toISOString()}, so Hearth has paused this webhook endpoint. Events are kept; resume it at ${link} once the receiver answers again.`;
        await insertOutboxRows(trx, admins.map((a) => ({
          kind: "webhook_paused",
          subject_key: `webhook_endpoint:${ep.id}:${ep.failing_since!.toISOString()}`,
          recipient_id: a.id,
          recipient_email: a.email,
          subject: "A webhook endpoint was paused",
          text_body: text,
          html_body: `<p>${escapeHtml(text)}</p>`,
        })));
      }
    }
    return give_up ? "failed" : "retry";
  });
}
