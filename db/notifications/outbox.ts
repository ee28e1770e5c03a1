import type PgBoss from "pg-boss";
import type { Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { insertOutboxRows, type OutboxInsert } from "@/db/outbox/commands";
import { enqueueOutboxSends } from "@/db/jobs/mail";

/** Writes messages to the outbox (once per kind, subject and recipient) and queues their sending. */
export async function queueMessages(boss: PgBoss, trx: Transaction<DB>, rows: OutboxInsert[]): Promise<number> {
  const inserted = await insertOutboxRows(trx, rows);
  await enqueueOutboxSends(boss, trx, inserted.map((r) => r.id));
  return inserted.length;
}
