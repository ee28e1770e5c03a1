import { sql } from "kysely";
import type { Database } from "@/db/client";

export async function pingDatabase(db: Database): Promise<number> {
  const started = performance.now();
  await sql`select 1`.execute(db);
  return performance.now() - started;
}

export async function findNewestHeartbeat(db: Database) {
  return db
    .selectFrom("worker_heartbeats")
    .select(["worker_id", "beat_at", "last_job_at"])
    .orderBy("beat_at", "desc")
    .limit(1)
    .executeTakeFirst();
}

export async function countLiveWorkers(db: Database, withinSeconds: number): Promise<number> {
  const row = await db
    .selectFrom("worker_heartbeats")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where("beat_at", ">", sql<Date>`now() - make_interval(secs => ${withinSeconds})`)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}
