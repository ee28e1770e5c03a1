import type { Job } from "pg-boss";
import type { Database } from "@/db/client";
import { listDueOutboxIds } from "@/db/queries/outbox";
import { sendMailJobSchema } from "@/lib/jobs/queues";
import { sendOutboxRow } from "@/lib/mail/send";

/**
 * Sends the outbox rows named by the jobs. A failed send does not fail the job: the row keeps
 * its own retry time (next_attempt_at, growing with each attempt) and the outbox pass sends it
 * when that comes, so an SMTP outage leaves the rows pending instead of burning job retries.
 */
export function sendMailHandler(db: Database) {
  return async (jobs: Job<unknown>[]) => {
    let sent = 0;
    for (const job of jobs) {
      const { outbox_id } = sendMailJobSchema.parse(job.data);
      const outcome = await sendOutboxRow(db, outbox_id);
      if (outcome.status === "sent") sent++;
      else if (outcome.status === "failed") break; // the relay is refusing: the rest wait for the outbox pass
    }
    return { sent };
  };
}

/** Sends due pending rows, oldest first, until one fails (then the relay is likely down). */
export async function drainOutbox(db: Database, limit: number): Promise<{ sent: number; failed: boolean }> {
  const ids = await listDueOutboxIds(db, limit);
  let sent = 0;
  for (const id of ids) {
    const outcome = await sendOutboxRow(db, id);
    if (outcome.status === "sent") sent++;
    else if (outcome.status === "failed") return { sent, failed: true };
  }
  return { sent, failed: false };
}
