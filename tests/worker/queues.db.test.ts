// The worker's queues on a fresh database: each queue is created with its retry settings in the
// same step, so there is no moment when a queue exists without them. The database writes webhook
// jobs itself with the settings it finds on the queue row (send_webhook_job), so a delivery queued
// in such a moment would have been tried only once.
import { afterAll, beforeAll, expect, it } from "vitest";
import PgBoss from "pg-boss";
import { sql } from "kysely";
import { ALL_QUEUES, QUEUES } from "@/lib/jobs/queues";
import { ensureQueues, queueSettings } from "@/worker/jobs";
import { webhookConfig } from "@/worker/webhooks";
import { createWorkerDb, type WorkerDb } from "./harness";

let w: WorkerDb;
let boss: PgBoss;

beforeAll(async () => {
  w = await createWorkerDb("queues");
  boss = new PgBoss({ connectionString: w.url, supervise: false, schedule: false, max: 2 });
  boss.on("error", () => {});
  await boss.start();
});

afterAll(async () => {
  await boss?.stop({ graceful: false, close: true }).catch(() => {});
  await w?.drop();
});

type QueueRow = { name: string; retry_limit: number; retry_delay: number; retry_backoff: boolean };
const queueRow = async (name: string) =>
  (await sql<QueueRow>`select name, retry_limit, retry_delay, retry_backoff from pgboss.queue where name = ${name}`.execute(w.db)).rows[0];

it("creates every queue with its retry settings already on the row when it first exists", async () => {
  // What the database would see right after each queue is created, before anything else runs.
  const atCreation = new Map<string, QueueRow | undefined>();
  const create = boss.createQueue.bind(boss);
  boss.createQueue = async (name, options) => {
    await create(name, options);
    atCreation.set(name, await queueRow(name));
  };
  await ensureQueues(boss);
  expect([...atCreation.keys()].sort()).toEqual([...ALL_QUEUES].sort());
  const hooks = webhookConfig();
  expect(atCreation.get(QUEUES.webhook)).toMatchObject({ retry_limit: hooks.maxAttempts - 1, retry_delay: hooks.retryBaseSeconds, retry_backoff: true });
  expect(hooks.maxAttempts).toBeGreaterThan(1);
  for (const [name, s] of Object.entries(queueSettings())) {
    expect(atCreation.get(name), name).toMatchObject({ retry_limit: s!.retryLimit, retry_delay: s!.retryDelay });
  }
});

it("gives a queue that already existed with pg-boss's defaults its settings", async () => {
  await sql`update pgboss.queue set retry_limit = 0, retry_backoff = false where name = ${QUEUES.webhook}`.execute(w.db);
  await ensureQueues(boss);
  expect(await queueRow(QUEUES.webhook)).toMatchObject({ retry_limit: webhookConfig().maxAttempts - 1, retry_backoff: true });
});
