import type PgBoss from "pg-boss";
import type { Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { inTrx } from "./boss";
import { QUEUES } from "@/lib/jobs/queues";

/**
 * Asks the worker to send these outbox rows, in the transaction that wrote them: a rolled-back
 * transition leaves neither the message nor its job. A row whose job is lost is still sent by
 * the sweep, which sends every pending row that is due.
 */
export async function enqueueOutboxSends(boss: PgBoss, trx: Transaction<DB>, outboxIds: string[]): Promise<void> {
  if (!outboxIds.length) return;
  await boss.insert(
    outboxIds.map((id) => ({ name: QUEUES.sendMail, data: { outbox_id: id }, singletonKey: `outbox:${id}` })),
    { db: inTrx(trx) },
  );
}
