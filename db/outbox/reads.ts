import { sql } from "kysely";
import type { Database } from "@/db/client";

/** Pending rows whose next attempt is due, oldest first (the sweep's share of the sending). */
export async function listDueOutboxIds(db: Database, limit: number): Promise<string[]> {
  const rows = await db
    .selectFrom("notification_outbox")
    .select("id")
    .where("status", "=", "pending")
    .where("next_attempt_at", "<=", sql<Date>`now()`)
    .orderBy("next_attempt_at")
    .orderBy("created_at")
    .limit(limit)
    .execute();
  return rows.map((r) => r.id);
}

export type OutboxSummary = { pending: number; sent: number; failed: number; oldest_pending_at: Date | null; last_error: string | null };

export async function summarizeOutbox(db: Database): Promise<OutboxSummary> {
  const row = await db
    .selectFrom("notification_outbox")
    .select([
      sql<number>`count(*) filter (where status = 'pending')`.as("pending"),
      sql<number>`count(*) filter (where status = 'sent')`.as("sent"),
      sql<number>`count(*) filter (where status = 'failed')`.as("failed"),
      sql<Date | null>`min(created_at) filter (where status = 'pending')`.as("oldest_pending_at"),
    ])
    .executeTakeFirstOrThrow();
  const last = await db
    .selectFrom("notification_outbox")
    .select("last_error")
    .where("status", "=", "pending")
    .where("last_error", "is not", null)
    .orderBy("next_attempt_at", "desc")
    .limit(1)
    .executeTakeFirst();
  return {
    pending: Number(row.pending),
    sent: Number(row.sent),
    failed: Number(row.failed),
    oldest_pending_at: row.oldest_pending_at,
    last_error: last?.last_error ?? null,
  };
}

export type OutboxListRow = {
  id: string;
  kind: string;
  subject_key: string;
  recipient_email: string;
  subject: string;
  status: "pending" | "sent" | "failed";
  attempts: number;
  last_error: string | null;
  created_at: Date;
  sent_at: Date | null;
  next_attempt_at: Date;
};

export async function listOutbox(db: Database, opts: { status?: "pending" | "sent" | "failed"; limit: number }): Promise<OutboxListRow[]> {
  let q = db
    .selectFrom("notification_outbox")
    .select(["id", "kind", "subject_key", "recipient_email", "subject", "status", "attempts", "last_error", "created_at", "sent_at", "next_attempt_at"]);
  if (opts.status) q = q.where("status", "=", opts.status);
  return q.orderBy("created_at", "desc").limit(opts.limit).execute();
}
