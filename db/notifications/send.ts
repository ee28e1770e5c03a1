import { sql } from "kysely";
import type { Database } from "@/db/client";
import { getEnv } from "@/lib/env";
import { backoffFromEnv, isPermanentSmtpFailure, leaseSecondsFromEnv, retryDelaySeconds } from "@/lib/mail/backoff";
import { getMailTransport } from "@/adapters/mail/transport";

export type SendOutcome =
  | { status: "sent"; message_id: string | null }
  | { status: "skipped"; reason: "not_found" | "not_pending" | "locked" }
  | { status: "failed"; error: string; attempts: number };

/**
 * After this many attempts that the relay answered with a permanent rejection of the message
 * or its recipient, a row is marked failed and left for a person to look at. A relay that is
 * down or refusing connections never fails a row: it stays pending and is retried with a
 * growing wait (next_attempt_at, lib/mail/backoff.ts) until the relay is back.
 */
export const MAX_SEND_ATTEMPTS = 8;

/** One Message-ID per outbox row, so a resend after a crash is recognisably the same message. */
export function outboxMessageId(id: string, from = getEnv().MAIL_FROM): string {
  const domain = /@([^>\s]+)/.exec(from)?.[1] ?? "hearth.invalid";
  return `<${id}@${domain}>`;
}

/**
 * Sends one notification_outbox row through the SMTP transport and records the outcome on the
 * row. Safe to call twice and from several processes at once: a sender first claims the row in
 * one statement (a pending row whose next attempt is due gets `next_attempt_at` moved a lease
 * ahead), sends with no transaction open, then records the outcome in a second statement. Only
 * the claimant sends, so a message goes out at most once per successful call. The SMTP call is
 * never made inside a database transaction: a slow or hung relay holds no row lock and no pooled
 * connection. A crash between the relay's acceptance and the record leaves the row pending; it is
 * sent again, with the same Message-ID, when the lease runs out (`HEARTH_MAIL_LEASE_SECONDS`).
 * A failure is recorded (attempts, last_error) and returned, not thrown.
 */
export async function sendOutboxRow(db: Database, id: string): Promise<SendOutcome> {
  const lease = leaseSecondsFromEnv();
  const row = await db
    .updateTable("notification_outbox")
    .set({ next_attempt_at: sql`now() + make_interval(secs => ${lease})` })
    .where("id", "=", id)
    .where("status", "=", "pending")
    .where("next_attempt_at", "<=", sql<Date>`now()`)
    .returning(["id", "recipient_email", "subject", "text_body", "html_body", "attempts", "kind", "subject_key"])
    .executeTakeFirst();
  if (!row) {
    const now = await db.selectFrom("notification_outbox").select("status").where("id", "=", id).executeTakeFirst();
    if (!now) return { status: "skipped", reason: "not_found" };
    return { status: "skipped", reason: now.status === "pending" ? "locked" : "not_pending" };
  }
  const attachments = await db.selectFrom("outbox_attachments").select(["filename", "content_type", "content"]).where("outbox_id", "=", id).execute();
  let info: { messageId?: string };
  try {
    info = await getMailTransport().sendMail({
      from: getEnv().MAIL_FROM,
      to: row.recipient_email,
      messageId: outboxMessageId(row.id),
      subject: row.subject,
      text: row.text_body,
      html: row.html_body,
      headers: { "X-Hearth-Kind": row.kind, "X-Hearth-Subject": row.subject_key },
      attachments: attachments.map((a) => ({ filename: a.filename, contentType: a.content_type, content: a.content })),
    });
  } catch (err) {
    const error = (err instanceof Error ? err.message : String(err)).slice(0, 500);
    const attempts = row.attempts + 1;
    const permanent = isPermanentSmtpFailure(err);
    const wait = retryDelaySeconds(attempts, backoffFromEnv());
    await db
      .updateTable("notification_outbox")
      .set({
        attempts,
        last_error: error,
        status: permanent && attempts >= MAX_SEND_ATTEMPTS ? "failed" : "pending",
        next_attempt_at: sql`now() + make_interval(secs => ${wait})`,
      })
      .where("id", "=", id)
      .where("status", "=", "pending")
      .execute();
    return { status: "failed", error, attempts };
  }
  // Between the relay's acceptance and this write a crash means a second send; not waiting for
  // the WAL flush keeps that window short. A database crash that loses the write only brings the
  // same second send, never a lost message.
  await db.transaction().execute(async (trx) => {
    await sql`set local synchronous_commit = off`.execute(trx);
    await trx
      .updateTable("notification_outbox")
      .set({ status: "sent", sent_at: sql`now()`, attempts: sql`attempts + 1`, last_error: null })
      .where("id", "=", id)
      .where("status", "=", "pending")
      .execute();
  });
  return { status: "sent", message_id: info.messageId ?? null };
}
