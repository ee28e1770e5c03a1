import { sql } from "kysely";
import type { Database } from "@/db/client";

// Read-only views of pg-boss's tables (schema "pgboss", created by the first worker or sender
// to start) and of the worker's sweep record. pgboss.* is not in db/schema.ts, hence raw SQL.

export async function pgbossInstalled(db: Database): Promise<boolean> {
  const r = await sql<{ ok: boolean }>`select to_regclass('pgboss.job') is not null as ok`.execute(db);
  return Boolean(r.rows[0]?.ok);
}

export type FailedJob = {
  id: string;
  queue: string;
  data: unknown;
  error: string | null;
  retry_count: number;
  retry_limit: number;
  created_on: Date;
  started_on: Date | null;
  failed_on: Date | null;
  singleton_key: string | null;
  archived: boolean;
};

/** Jobs that used up their retries, newest first, from the live table and the archive. */
export async function listFailedJobs(db: Database, opts: { queue?: string; limit: number }): Promise<FailedJob[]> {
  if (!(await pgbossInstalled(db))) return [];
  const queue = opts.queue ?? null;
  const r = await sql<Omit<FailedJob, "error"> & { output: unknown }>`
    select * from (
      select id, name as queue, data, output, retry_count, retry_limit, created_on, started_on, completed_on as failed_on, singleton_key, false as archived
      from pgboss.job where state = 'failed' and (${queue}::text is null or name = ${queue})
      union all
      select id, name, data, output, retry_count, retry_limit, created_on, started_on, completed_on, singleton_key, true
      from pgboss.archive where state = 'failed' and (${queue}::text is null or name = ${queue})
    ) f
    order by coalesce(failed_on, created_on) desc
    limit ${opts.limit}`.execute(db);
  return r.rows.map(({ output, ...row }) => ({ ...row, error: errorText(output) }));
}

function errorText(output: unknown): string | null {
  if (output == null) return null;
  if (typeof output === "string") return output;
  const o = output as { message?: unknown; value?: { message?: unknown } };
  if (typeof o.message === "string") return o.message;
  if (o.value && typeof o.value.message === "string") return o.value.message;
  return JSON.stringify(output).slice(0, 500);
}

export type QueueStat = {
  queue: string;
  /** Due and not yet picked up. */
  waiting: number;
  /** Sent with a start time still ahead (a booking's end, a retry's backoff). */
  scheduled: number;
  active: number;
  failed: number;
  /** Seconds the longest-waiting due job has waited. */
  oldest_waiting_s: number | null;
};

export async function listQueueStats(db: Database): Promise<QueueStat[]> {
  if (!(await pgbossInstalled(db))) return [];
  const r = await sql<{ queue: string; waiting: number; scheduled: number; active: number; failed: number; oldest_waiting_s: number | null }>`
    select q.name as queue,
      count(j.id) filter (where j.state in ('created', 'retry') and j.start_after <= now()) as waiting,
      count(j.id) filter (where j.state in ('created', 'retry') and j.start_after > now()) as scheduled,
      count(j.id) filter (where j.state = 'active') as active,
      count(j.id) filter (where j.state = 'failed') as failed,
      extract(epoch from now() - min(j.start_after) filter (where j.state in ('created', 'retry') and j.start_after <= now()))::float8 as oldest_waiting_s
    from pgboss.queue q
    left join pgboss.job j on j.name = q.name and j.state in ('created', 'retry', 'active', 'failed')
    where q.name not like '\\_\\_%'
    group by q.name
    order by q.name`.execute(db);
  return r.rows.map((row) => ({
    queue: row.queue,
    waiting: Number(row.waiting),
    scheduled: Number(row.scheduled),
    active: Number(row.active),
    failed: Number(row.failed),
    oldest_waiting_s: row.oldest_waiting_s == null ? null : Math.round(Number(row.oldest_waiting_s)),
  }));
}

export type SweepRecord = {
  worker_id: string;
  started_at: Date;
  finished_at: Date | null;
  advanced: number;
  rescaled: number;
  mail_sent: number;
  error: string | null;
};

export async function findLastSweep(db: Database): Promise<SweepRecord | undefined> {
  return db
    .selectFrom("worker_sweeps")
    .select(["worker_id", "started_at", "finished_at", "advanced", "rescaled", "mail_sent", "error"])
    .where("finished_at", "is not", null)
    .orderBy("finished_at", "desc")
    .limit(1)
    .executeTakeFirst();
}

export async function listRecentSweeps(db: Database, limit: number): Promise<SweepRecord[]> {
  return db
    .selectFrom("worker_sweeps")
    .select(["worker_id", "started_at", "finished_at", "advanced", "rescaled", "mail_sent", "error"])
    .orderBy("started_at", "desc")
    .limit(limit)
    .execute();
}
