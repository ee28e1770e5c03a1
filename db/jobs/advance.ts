import type PgBoss from "pg-boss";
import type { Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { getSender, inTrx } from "./boss";
import { QUEUES, type AdvanceJob } from "@/lib/jobs/queues";

/**
 * Asks the worker to advance a booking at its scheduled end. Sent inside the booking's own
 * transaction, so a rolled-back move sends nothing. The job carries the booking's version: a
 * booking moved or cancelled since then has another version, and the worker ignores the old job.
 */
export async function scheduleAdvance(trx: Transaction<DB>, job: AdvanceJob): Promise<void> {
  await sendAdvance(await getSender(), trx, job);
}

/** scheduleAdvance with a given pg-boss instance (the worker's own, or a test's). */
export async function sendAdvance(boss: PgBoss, trx: Transaction<DB>, job: AdvanceJob): Promise<void> {
  await boss.send(QUEUES.advance, job, {
    startAfter: new Date(job.due_at),
    singletonKey: `${job.entity}:${job.id}:${job.version}`,
    retryLimit: 5,
    retryBackoff: true,
    db: inTrx(trx),
  });
}
