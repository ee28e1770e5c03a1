import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { findLastSweep, listFailedJobs, listQueueStats, listRecentSweeps, pgbossInstalled } from "@/db/jobs/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { listJobsQuerySchema } from "@/lib/jobs/schemas";

export const dynamic = "force-dynamic";

// GET /api/jobs – background queues, failed jobs and recent sweeps; read-only (admin)
export async function GET(req: Request) {
  try {
    await requireUser("jobs:read");
    const query = listJobsQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
    const db = getDb();
    const [installed, queues, failed, last_sweep, sweeps] = await Promise.all([
      pgbossInstalled(db),
      listQueueStats(db),
      listFailedJobs(db, { queue: query.queue, limit: query.limit }),
      findLastSweep(db),
      listRecentSweeps(db, 20),
    ]);
    return NextResponse.json({ installed, queues, failed, last_sweep: last_sweep ?? null, sweeps }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
