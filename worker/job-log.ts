import type { Job } from "pg-boss";
import { logger } from "@/adapters/log/logger";

/**
 * One JSON line per job a handler took: queue, job id, outcome and the batch's ms. A handler that
 * throws fails its whole batch (pg-boss retries it), so each job in it is logged as failed with
 * the error; a handler that fails single jobs itself (boss.fail) says so in its own lines.
 */
export function logJobs<J extends Job<unknown>, R>(queue: string, handler: (jobs: J[]) => Promise<R>): (jobs: J[]) => Promise<R> {
  return async (jobs) => {
    const started = performance.now();
    const ms = () => Math.round((performance.now() - started) * 10) / 10;
    try {
      const result = await handler(jobs);
      const took = ms();
      for (const job of jobs) logger.info({ queue, job_id: job.id, outcome: "completed", ms: took }, "job");
      return result;
    } catch (err) {
      const took = ms();
      for (const job of jobs) logger.warn({ queue, job_id: job.id, outcome: "failed", ms: took, err }, "job");
      throw err;
    }
  };
}
