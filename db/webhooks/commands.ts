import type PgBoss from "pg-boss";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import { getSender } from "@/db/jobs/boss";
import { sendWebhookJobs } from "@/db/jobs/webhooks";
import { insertOutboxRows } from "@/db/outbox/commands";
import { AppError } from "@/lib/errors";
import { escapeHtml } from "@/lib/integrations/html";
import { PAUSE_AFTER_FAILING_MS, newWebhookSecret, type CreateWebhookInput } from "@/lib/integrations/webhook-signature";

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
export async function updateWebhookEndpoint(
  db: Database,
  actorId: string,
  id: string,
  input: { version: number; active?: boolean; resume?: true; events?: string[] },
  boss?: PgBoss,
) {
  const sender = input.resume || input.active ? (boss ?? (await getSender())) : null;
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
    // A job that found its endpoint paused or switched off ended without sending: the waiting
    // deliveries get a job again, in this transaction, once the endpoint takes deliveries again.
    if (sender && row.active && !row.paused_at) {
      const waiting = await trx.selectFrom("webhook_deliveries").select("id").where("endpoint_id", "=", id).where("state", "=", "pending").orderBy("created_at").execute();
      await sendWebhookJobs(sender, trx, waiting.map((w) => w.id));
    }
    await trx.insertInto("events").values({ entity: "webhook_endpoint", entity_id: id, kind: input.resume ? "resumed" : "edit", actor_id: actorId, data: JSON.stringify(input) }).execute();
    return { ...row, paused_at: row.paused_at?.toISOString() ?? null };
  });
}

/**
 * Sends one delivery again (same event id, fresh signature): back to pending and a new pg-boss job,
 * in one transaction. A delivery being sent right now is left alone.
 */
export async function redeliverWebhook(db: Database, deliveryId: string, boss?: PgBoss) {
  const sender = boss ?? (await getSender());
  return db.transaction().execute(async (trx) => {
    const row = await trx
      .updateTable("webhook_deliveries")
      .set({ state: "pending", next_attempt_at: sql`now()` })
      .where("id", "=", deliveryId)
      .where("state", "<>", "sending")
      .returning(["id", "state"])
      .executeTakeFirst();
    if (!row) {
      const exists = await trx.selectFrom("webhook_deliveries").select("state").where("id", "=", deliveryId).executeTakeFirst();
      if (!exists) throw new AppError("not_found", "No such delivery.");
      throw new AppError("conflict", "This delivery is being sent right now.");
    }
    await sendWebhookJobs(sender, trx, [row.id]);
    return row;
  });
}

export type ClaimedDelivery = { id: string; attempts: number; event_id: string; type: string; payload: unknown; created_at: Date; url: string; secret: string; endpoint_id: string };

/**
 * Takes one delivery for the pg-boss job `jobId`, or nothing. pg-boss hands one job id to one
 * worker at a time; this guard covers the other copies: a second job for the same delivery (a
 * resume, a duplicate) finds it delivered, given up or being sent by another job and sends
 * nothing. The job that claimed it may take it again (pg-boss retrying it after its worker died
 * mid-send). Deliveries of paused or switched-off endpoints wait for a resume, which sends a job.
 */
export async function claimDelivery(db: Database, deliveryId: string, jobId: string): Promise<ClaimedDelivery | null> {
  const { rows } = await sql<ClaimedDelivery>`
    update webhook_deliveries d
      set state = 'sending', attempts = d.attempts + 1, job_id = ${jobId}
    from webhook_events ev, webhook_endpoints e
    where d.id = ${deliveryId} and ev.id = d.event_id and e.id = d.endpoint_id
      and e.active and e.paused_at is null
      and (d.state = 'pending' or (d.state = 'sending' and d.job_id = ${jobId}))
    returning d.id, d.attempts, d.event_id, ev.type, ev.payload, ev.created_at, e.url, e.secret, e.id as endpoint_id`.execute(db);
  return rows[0] ?? null;
}

/**
 * Records one attempt's answer. Success: delivered, the endpoint's failure streak ends. Failure:
 * pending until pg-boss retries the job (`retryInSeconds` at the earliest), or given up when it
 * was the job's last try; an endpoint that has failed for a day is paused and its creator (or,
 * without one, every admin) is mailed once.
 */
export async function recordAttempt(
  db: Database,
  d: ClaimedDelivery,
  result: { status: number | null; error: string | null; ms: number },
  opts: { lastTry: boolean; retryInSeconds: number; appUrl: string },
): Promise<"delivered" | "retry" | "failed"> {
  const ok = result.status !== null && result.status >= 200 && result.status < 300;
  return db.transaction().execute(async (trx) => {
    await trx.insertInto("webhook_attempts").values({ delivery_id: d.id, status: result.status, error: result.error?.slice(0, 500) ?? null, duration_ms: Math.round(result.ms) }).execute();
    if (ok) {
      await trx.updateTable("webhook_deliveries").set({ state: "delivered", delivered_at: sql`now()`, last_status: result.status, last_error: null }).where("id", "=", d.id).execute();
      await trx.updateTable("webhook_endpoints").set({ failing_since: null }).where("id", "=", d.endpoint_id).where("failing_since", "is not", null).execute();
      return "delivered";
    }
    const give_up = opts.lastTry;
    await trx
      .updateTable("webhook_deliveries")
      .set({
        state: give_up ? "failed" : "pending",
        last_status: result.status,
        last_error: result.error?.slice(0, 500) ?? null,
        next_attempt_at: sql`now() + make_interval(secs => ${opts.retryInSeconds})`,
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
