import type { Database } from "@/db/client";

export type OutboxInsert = {
  kind: string;
  subject_key: string;
  recipient_id: string | null;
  recipient_email: string;
  subject: string;
  text_body: string;
  html_body: string;
};

/**
 * Inserts messages, skipping any whose (kind, subject, recipient) is already in the outbox:
 * a job that runs twice writes each message once. Returns only the rows this call inserted.
 */
export async function insertOutboxRows(db: Database, rows: OutboxInsert[]): Promise<{ id: string }[]> {
  if (!rows.length) return [];
  return db
    .insertInto("notification_outbox")
    .values(rows)
    .onConflict((oc) => oc.columns(["kind", "subject_key", "recipient_email"]).doNothing())
    .returning(["id"])
    .execute();
}
