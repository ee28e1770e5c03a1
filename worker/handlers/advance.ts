import type PgBoss from "pg-boss";
import type { Job } from "pg-boss";
import type { Database } from "@/db/client";
import { advanceBooking, type AdvanceResult } from "@/db/advance/commands";
import { advanceJobSchema, QUEUES } from "@/lib/jobs/queues";
import { mapLimit } from "../limit";

export type AdvanceTally = { advanced: number; skipped: Record<string, number>; failed: number };

/**
 * A booking reached its scheduled end. Each job runs in its own transaction; one that throws is
 * failed alone (pg-boss retries it with backoff) and does not take the rest of the batch with it.
 */
export function advanceHandler(db: Database, boss: PgBoss, opts: { quiet?: boolean; parallel?: number } = {}) {
  return async (jobs: Job<unknown>[]) => {
    const tally: AdvanceTally = { advanced: 0, skipped: {}, failed: 0 };
    // Bookings of one batch are distinct rows with distinct units: they run side by side.
    await mapLimit(jobs, opts.parallel ?? 4, async (job) => {
      const parsed = advanceJobSchema.safeParse(job.data);
      if (!parsed.success) {
        tally.failed++;
        await boss.fail(QUEUES.advance, job.id, { message: `bad payload: ${parsed.error.issues[0]?.message ?? "invalid"}` });
        return;
      }
      let result: AdvanceResult;
      try {
        result = await advanceBooking(db, boss, parsed.data.entity, parsed.data.id, { via: "job", job: parsed.data, job_id: job.id });
      } catch (err) {
        tally.failed++;
        const message = err instanceof Error ? err.message : String(err);
        console.error(`[worker] advance ${parsed.data.entity} ${parsed.data.id} failed: ${message}`);
        await boss.fail(QUEUES.advance, job.id, { message });
        return;
      }
      if (result.status === "advanced") tally.advanced++;
      else tally.skipped[result.reason] = (tally.skipped[result.reason] ?? 0) + 1;
    });
    if (!opts.quiet && (tally.advanced || tally.failed || Object.keys(tally.skipped).length)) {
      const skipped = Object.entries(tally.skipped).map(([k, n]) => `${n} ${k}`).join(", ");
      console.log(`[worker] advance: ${jobs.length} job(s): ${tally.advanced} advanced${skipped ? `, skipped ${skipped}` : ""}${tally.failed ? `, ${tally.failed} failed` : ""}`);
    }
    return tally;
  };
}
