import type { Job } from "pg-boss";
import type { Database } from "@/db/client";
import { listDueOutboxIds } from "@/db/outbox/reads";
import { sendMailJobSchema } from "@/lib/jobs/queues";
import { sendOutboxRow } from "@/db/notifications/send";
import { mapLimit } from "../limit";

/**
 * Sends the outbox rows named by the jobs. A failed send does not fail the job: the row keeps
 * its own retry time (next_attempt_at, growing with each attempt) and the outbox pass sends it
 * when that comes, so an SMTP outage leaves the rows pending instead of burning job retries.
 */
export function sendMailHandler(db: Database, opts: { parallel?: number } = {}) {
  return async (jobs: Job<unknown>[]) => {
    let sent = 0;
    let refused = false;
    await mapLimit(jobs, opts.parallel ?? 3, async (job) => {
      if (refused) return; // the relay is refusing: the rest wait for the outbox pass
      const { outbox_id } = sendMailJobSchema.parse(job.data);
      const outcome = await sendOutboxRow(db, outbox_id);
      if (outcome.status === "sent") sent++;
      else if (outcome.status === "failed") refused = true;
    });
    return { sent };
  };
}

/** Sends due pending rows, oldest first, until one fails (then the relay is likely down). */
export async function drainOutbox(db: Database, limit: number, parallel = 3): Promise<{ sent: number; failed: boolean }> {
  const ids = await listDueOutboxIds(db, limit);
  let sent = 0;
  let failed = false;
  await mapLimit(ids, parallel, async (id) => {
    if (failed) return;
    const outcome = await sendOutboxRow(db, id);
    if (outcome.status === "sent") sent++;
    else if (outcome.status === "failed") failed = true;
  });
  return { sent, failed };
}
