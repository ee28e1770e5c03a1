import type PgBoss from "pg-boss";
import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { inTrx } from "./boss";
import { QUEUES, type WebhookJob } from "@/lib/jobs/queues";

/**
 * Sends one pg-boss job per delivery inside `trx`, the transaction that made the deliveries due
 * (a redelivery, a resumed endpoint), and notes each job on its delivery. The queue's own retry
 * settings apply (worker/jobs.ts sets them). A queue that does not exist yet (no worker has ever
 * started) makes send() return null: the delivery keeps no job and the worker sends it when it
 * starts and at each sweep (sendUnqueuedDeliveries).
 */
export async function sendWebhookJobs(boss: PgBoss, trx: Transaction<DB>, deliveryIds: string[]): Promise<number> {
  let sent = 0;
  for (const delivery_id of deliveryIds) {
    const data: WebhookJob = { delivery_id };
    const jobId = await boss.send(QUEUES.webhook, data, { db: inTrx(trx) });
    if (!jobId) console.warn(`[jobs] queue ${QUEUES.webhook} does not exist yet; delivery ${delivery_id} waits for the worker to start`);
    else sent++;
    await trx.updateTable("webhook_deliveries").set({ job_id: jobId }).where("id", "=", delivery_id).execute();
  }
  return sent;
}

/**
 * Deliveries written while the queue did not exist yet (send_webhook_job in
 * migrations/202612042233_webhook_jobs.sql leaves them without a job, with a warning): the worker
 * sends their jobs once it has created the queue. Never touches a delivery that has a job.
 */
export async function sendUnqueuedDeliveries(db: Database, boss: PgBoss, limit = 500): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const { rows } = await sql<{ id: string }>`
      select d.id from webhook_deliveries d
      join webhook_endpoints e on e.id = d.endpoint_id
      where d.job_id is null and d.state = 'pending' and e.active and e.paused_at is null
      order by d.created_at
      limit ${limit}
      for update of d skip locked`.execute(trx);
    return sendWebhookJobs(boss, trx, rows.map((r) => r.id));
  });
}
