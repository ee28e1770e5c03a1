import type PgBoss from "pg-boss";
import type { Job } from "pg-boss";
import { logger } from "@/adapters/log/logger";

// Jobs a handler failed itself (boss.fail) while the rest of its batch went on.
const failedByHandler = new Set<string>();

/** Notes the jobs handlers fail one by one, so that their log lines say failed. */
export function trackFailures(boss: PgBoss): void {
  const fail = boss.fail.bind(boss) as (...args: unknown[]) => Promise<void>;
  (boss as unknown as { fail: (...args: unknown[]) => Promise<void> }).fail = (...args: unknown[]) => {
    const ids = args[1];
    for (const id of Array.isArray(ids) ? ids : [ids]) if (typeof id === "string") failedByHandler.add(id);
    return fail(...args);
  };
}

/**
 * One JSON line per job a handler took: queue, job id, outcome and the batch's ms. A handler that
 * throws fails its whole batch (pg-boss retries it), so each job in it is logged as failed.
 */
export function logJobs<J extends Job<unknown>, R>(queue: string, handler: (jobs: J[]) => Promise<R>): (jobs: J[]) => Promise<R> {
  return async (jobs) => {
    const started = performance.now();
    const ms = () => Math.round((performance.now() - started) * 10) / 10;
    try {
      const result = await handler(jobs);
      const took = ms();
      for (const job of jobs) {
        const failed = failedByHandler.delete(job.id);
        (failed ? logger.warn.bind(logger) : logger.info.bind(logger))({ queue, job_id: job.id, outcome: failed ? "failed" : "completed", ms: took }, "job");
      }
      return result;
    } catch (err) {
      const took = ms();
      for (const job of jobs) {
        failedByHandler.delete(job.id);
        logger.warn({ queue, job_id: job.id, outcome: "failed", ms: took, err }, "job");
      }
      throw err;
    }
  };
}
