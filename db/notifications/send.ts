import { sql } from "kysely";
import type { Database } from "@/db/client";
import { getEnv } from "@/lib/env";
import { backoffFromEnv, isPermanentSmtpFailure, retryDelaySeconds } from "@/lib/mail/backoff";
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
 * row. Safe to call twice and from several processes at once: the row is locked (SKIP LOCKED) for
 * the duration of the send and only a pending row is sent, so a message goes out at most once per
 * successful call. A failure is recorded (attempts, last_error) and returned, not thrown; callers
 * that want a retry (the worker) throw on `failed` themselves.
 */
export async function sendOutboxRow(db: Database, id: string): Promise<SendOutcome> {
  return db.transaction().execute(async (trx) => {
    // Between the relay's acceptance and this commit a crash means a second send; not waiting
    // for the WAL flush keeps that window short. A database crash that loses the commit only
    // brings the same second send, never a lost message.
    await sql`set local synchronous_commit = off`.execute(trx);
    const row = await trx
      .selectFrom("notification_outbox")
      .select(["id", "status", "recipient_email", "subject", "text_body", "html_body", "attempts", "kind", "subject_key"])
      .where("id", "=", id)
      .forUpdate()
      .skipLocked()
      .executeTakeFirst();
    if (!row) {
      const exists = await trx.selectFrom("notification_outbox").select("id").where("id", "=", id).executeTakeFirst();
      return { status: "skipped", reason: exists ? "locked" : "not_found" } as const;
    }
    if (row.status !== "pending") return { status: "skipped", reason: "not_pending" } as const;
    const attachments = await trx.selectFrom("outbox_attachments").select(["filename", "content_type", "content"]).where("outbox_id", "=", id).execute();
    try {
      const info = await getMailTransport().sendMail({
        from: getEnv().MAIL_FROM,
        to: row.recipient_email,
        messageId: outboxMessageId(row.id),
        subject: row.subject,
        text: row.text_body,
        html: row.html_body,
        headers: { "X-Hearth-Kind": row.kind, "X-Hearth-Subject": row.subject_key },
        attachments: attachments.map((a) => ({ filename: a.filename, contentType: a.content_type, content: a.content })),
      });
      await trx
        .updateTable("notification_outbox")
        .set({ status: "sent", sent_at: sql`now()`, attempts: sql`attempts + 1`, last_error: null })
        .where("id", "=", id)
        .execute();
      return { status: "sent", message_id: info.messageId ?? null } as const;
    } catch (err) {
      const error = (err instanceof Error ? err.message : String(err)).slice(0, 500);
      const attempts = row.attempts + 1;
      const permanent = isPermanentSmtpFailure(err);
      const wait = retryDelaySeconds(attempts, backoffFromEnv());
      await trx
        .updateTable("notification_outbox")
        .set({
          attempts,
          last_error: error,
          status: permanent && attempts >= MAX_SEND_ATTEMPTS ? "failed" : "pending",
          next_attempt_at: sql`now() + make_interval(secs => ${wait})`,
        })
        .where("id", "=", id)
        .execute();
      return { status: "failed", error, attempts } as const;
    }
  });
}
