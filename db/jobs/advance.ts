import type PgBoss from "pg-boss";
import { sql, type Transaction } from "kysely";
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
  // The booking's earlier jobs, still waiting for their time, are superseded by this one (the
  // worker would only skip them): deleted in the same transaction, so a booking moved a hundred
  // times leaves one waiting job, not a hundred. pg-boss's own deleteJob does the deleting.
  const superseded = await sql<{ id: string }>`
    select id from pgboss.job
    where name = ${QUEUES.advance} and state = 'created' and singleton_key like ${`${job.entity}:${job.id}:%`}`.execute(trx);
  if (superseded.rows.length) await boss.deleteJob(QUEUES.advance, superseded.rows.map((r) => r.id), { db: inTrx(trx) });
  await boss.send(QUEUES.advance, job, {
    startAfter: new Date(job.due_at),
    singletonKey: `${job.entity}:${job.id}:${job.version}`,
    retryLimit: 5,
    retryBackoff: true,
    db: inTrx(trx),
  });
}
