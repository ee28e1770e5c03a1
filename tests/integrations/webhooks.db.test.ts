// Outgoing webhooks against the running app, its worker and the local webhook receiver
// (scripts/fakes/webhook-receiver.ts), which checks each signature with the documented scheme.
// Each delivery is a pg-boss job ("deliver-webhook") written in the event's own transaction.
import { randomUUID } from "node:crypto";
import path from "node:path";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { inTrx } from "@/db/jobs/boss";
import { sendUnqueuedDeliveries } from "@/db/jobs/webhooks";
import { QUEUES } from "@/lib/jobs/queues";
import { webhookConfig, webhookQueueOptions } from "@/worker/webhooks";
import { hmacSha256Hex, signatureHeader, verifySignature } from "@/lib/integrations/webhook-signature";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { readFileSync } from "node:fs";
import { spawnCollecting, stackLogDir, type Spawned } from "../helpers/spare-stack";

const receiver = process.env.WEBHOOK_RECEIVER_URL ?? `http://127.0.0.1:${process.env.WEBHOOK_RECEIVER_PORT ?? 2527}`;
const { db, close } = testDb();
let admin: string;
const stamp = Date.now().toString(36);

type Received = { event_id: string; type: string; verified: boolean; reason: string | null; status: number; body: { id: string; type: string; data: Record<string, unknown> } };

async function received(name: string): Promise<Received[]> {
  return (await (await fetch(`${receiver}/_fake/hooks/${name}`)).json()).deliveries;
}
async function configure(name: string, cfg: Record<string, unknown>) {
  const res = await fetch(`${receiver}/_fake/hooks/${name}`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify(cfg) });
  expect(res.status).toBe(200);
}
async function waitFor<T>(what: string, fn: () => Promise<T | undefined | false>, ms = 20_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** Registers an endpoint at the receiver under `name` and tells the receiver its secret. */
async function register(name: string, events: string[], cfg: Record<string, unknown> = {}) {
  const res = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: `${receiver}/hooks/${name}`, description: `test ${name}`, events } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect(res.body.endpoint.secret).toMatch(/^whsec_/);
  await configure(name, { secret: res.body.endpoint.secret, ...cfg });
  return res.body.endpoint as { id: string; secret: string; version: number };
}

async function createOrder(code: string) {
  const res = await api("/api/orders", { method: "POST", cookie: admin, body: { code, customer: "Webhook test", due_at: new Date(Date.now() + 20 * 86_400_000).toISOString() } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.order as { id: string };
}

type JobRow = { id: string; state: string; retry_limit: number; retry_count: number; retry_delay: number; retry_backoff: boolean; start_after: Date; data: { delivery_id: string } };
/** The pg-boss jobs written for one delivery, oldest first. */
const jobsOf = async (deliveryId: string) =>
  (await sql<JobRow>`select id, state::text, retry_limit, retry_count, retry_delay, retry_backoff, start_after, data from pgboss.job where name = ${QUEUES.webhook} and data->>'delivery_id' = ${deliveryId} order by created_on`.execute(db)).rows;
/** Lets the back-off wait of a job that pg-boss will retry pass now (instead of waiting out 30 s). */
async function retryNow(deliveryId: string) {
  const job = await waitFor("the job to wait for its retry", async () => (await jobsOf(deliveryId)).find((j) => j.state === "retry"));
  await sql`update pgboss.job set start_after = now() where id = ${job.id} and state = 'retry'`.execute(db);
  return job;
}

// a pg-boss of the test's own, as the app's sender is: it only sends
let boss: PgBoss;

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  boss = new PgBoss({ connectionString: process.env.DATABASE_URL, supervise: false, schedule: false, max: 2 });
  boss.on("error", () => {});
  await boss.start();
});
afterAll(async () => {
  // leave no endpoint behind to receive other tests' events
  await db.updateTable("webhook_endpoints").set({ active: false }).where("description", "like", "test wh-%").execute();
  await boss?.stop({ graceful: false, close: true });
  await close();
});

describe("signature scheme", () => {
  it("verifies its own signature and refuses a changed body, a wrong secret and an old timestamp", () => {
    const now = 1_800_000_000;
    const h = signatureHeader("whsec_a", now, '{"a":1}');
    expect(verifySignature("whsec_a", h, '{"a":1}', now)).toEqual({ ok: true, timestamp: now });
    expect(verifySignature("whsec_a", h, '{"a":2}', now).ok).toBe(false);
    expect(verifySignature("whsec_b", h, '{"a":1}', now).ok).toBe(false);
    expect(verifySignature("whsec_a", h, '{"a":1}', now + 301).ok).toBe(false);
    // RFC 4231 §4.3, test case 2: HMAC-SHA-256(key "Jefe", "what do ya want for nothing?")
    expect(hmacSha256Hex("Jefe", "what do ya want for nothing?")).toBe("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843");
    expect(h).toBe(`t=${now},v1=${hmacSha256Hex("whsec_a", `${now}.{"a":1}`)}`);
  });
});

describe("deliveries", () => {
  it("an order created sends one signed delivery the receiver verifies", async () => {
    const name = `wh-${stamp}-a`;
    const ep = await register(name, ["order.created"]);
    const order = await createOrder(`WH-${stamp}-A`);
    const [got] = await waitFor("the delivery", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length ? r : undefined;
    });
    expect(got).toMatchObject({ type: "order.created", verified: true, status: 204 });
    expect(got.body).toMatchObject({ type: "order.created", data: { entity: "order", id: order.id, code: `WH-${stamp}-A` } });
    expect(got.event_id).toBe(got.body.id);
    const log = await waitFor("the log", async () => {
      const r = await api(`/api/webhooks/${ep.id}/deliveries`, { cookie: admin });
      return r.body.deliveries.find((d: { state: string }) => d.state === "delivered");
    });
    expect(log).toMatchObject({ type: "order.created", last_status: 204, attempts: 1 });
    // delivered by its pg-boss job, which completed
    const [job] = await waitFor("the completed job", async () => {
      const j = await jobsOf(log.id);
      return j.length === 1 && j[0].state === "completed" ? j : undefined;
    });
    expect(job.data).toEqual({ delivery_id: log.id });
  });

  it("retries after a 500 from the receiver, with the same event id, and a redelivery can be asked for", async () => {
    const name = `wh-${stamp}-b`;
    const ep = await register(name, ["order.created"], { fail_next: 1, fail_status: 500 });
    const order = await createOrder(`WH-${stamp}-B`);
    const first = await waitFor("the failed attempt", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("endpoint_id", "=", ep.id).executeTakeFirst();
      return r && r.state === "pending" && r.attempts === 1 ? r : undefined;
    });
    expect(first.last_status).toBe(500);
    expect(first.next_attempt_at.getTime()).toBeGreaterThan(Date.now());
    // the failed attempt failed its job: pg-boss retries it, with the queue's exponential back-off
    const cfg = webhookConfig();
    const waiting = await retryNow(first.id);
    expect(waiting).toMatchObject({ id: first.job_id, retry_count: 0, retry_limit: cfg.maxAttempts - 1, retry_delay: cfg.retryBaseSeconds, retry_backoff: true });
    // pg-boss 10 waits retry_delay · 2^(n+1)/2 · (1 + random()) after the n-th retry's failure (plans.js, failJobs)
    expect(waiting.start_after.getTime()).toBeGreaterThanOrEqual(first.next_attempt_at.getTime() - 2000);
    expect(waiting.start_after.getTime()).toBeLessThan(first.next_attempt_at.getTime() + cfg.retryBaseSeconds * 1000 + 2000);
    const both = await waitFor("the retry", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length === 2 ? r : undefined;
    });
    expect(both.map((d) => d.status)).toEqual([500, 204]);
    expect(both.every((d) => d.verified)).toBe(true);
    expect(both[0].event_id).toBe(both[1].event_id);
    const done = await db.selectFrom("webhook_deliveries").selectAll().where("id", "=", first.id).executeTakeFirstOrThrow();
    expect(done).toMatchObject({ state: "delivered", attempts: 2, last_status: 204 });
    const attempts = await db.selectFrom("webhook_attempts").select("status").where("delivery_id", "=", first.id).orderBy("attempted_at").execute();
    expect(attempts.map((a) => a.status)).toEqual([500, 204]);
    expect(done.job_id).toBe(first.job_id);

    // a copy of the delivered delivery's job (as a duplicate pg-boss might hand out) sends nothing
    await sql`select send_webhook_job(${first.id}::uuid)`.execute(db);
    const copy = (await jobsOf(first.id)).at(-1)!;
    await waitFor("the copy to complete", async () => (await jobsOf(first.id)).find((j) => j.id === copy.id && j.state === "completed"));
    expect((await received(name)).filter((d) => d.body.data?.id === order.id)).toHaveLength(2);

    // a manual redelivery sends a new job, which does POST again
    expect((await api(`/api/webhook-deliveries/${first.id}/redeliver`, { method: "POST", cookie: admin })).status).toBe(202);
    const three = await waitFor("the redelivery", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length === 3 ? r : undefined;
    });
    expect(three[2]).toMatchObject({ event_id: both[0].event_id, verified: true });
    const jobs = await jobsOf(first.id);
    expect(jobs).toHaveLength(3);
    const again = await waitFor("the redelivery logged", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("id", "=", first.id).executeTakeFirstOrThrow();
      return r.state === "delivered" && r.attempts === 3 ? r : undefined;
    });
    expect(again.job_id).toBe(jobs[2].id);
  });

  it("the delivery's pg-boss job is written in the event's transaction: a change that rolls back leaves neither", async () => {
    const name = `wh-${stamp}-c`;
    const ep = await register(name, ["order.created"]);
    let deliveryId = "";
    await expect(
      db.transaction().execute(async (trx) => {
        await trx.insertInto("orders").values({ code: `WH-${stamp}-C`, customer: "rolled back", due_at: new Date() }).execute();
        const rows = await trx.selectFrom("webhook_deliveries").select(["id", "job_id"]).where("endpoint_id", "=", ep.id).execute();
        expect(rows).toHaveLength(1);
        deliveryId = rows[0].id;
        // the job is there, inside the transaction, before anything commits
        const job = await sql<{ id: string; name: string; data: unknown }>`select id, name, data from pgboss.job where data->>'delivery_id' = ${deliveryId}`.execute(trx);
        expect(job.rows).toEqual([{ id: rows[0].job_id, name: QUEUES.webhook, data: { delivery_id: deliveryId } }]);
        throw new Error("roll back");
      }),
    ).rejects.toThrow("roll back");
    expect(deliveryId).not.toBe("");
    expect(await db.selectFrom("webhook_deliveries").select("id").where("endpoint_id", "=", ep.id).execute()).toHaveLength(0);
    expect(await jobsOf(deliveryId)).toHaveLength(0);
    await new Promise((r) => setTimeout(r, 1500));
    expect(await received(name)).toHaveLength(0);
  });

  it("the job the database writes is the job pg-boss's send() writes, with the queue's retry settings", async () => {
    const name = `wh-${stamp}-f`;
    const ep = await register(name, ["order.created"]);
    type Row = { retry_limit: number; retry_delay: number; retry_backoff: boolean; expire_in: string; policy: string | null; priority: number; dead_letter: string | null; keep_for: string; state: string };
    const cols = sql`retry_limit, retry_delay, retry_backoff, expire_in::text, policy, priority, dead_letter, (keep_until - start_after)::text as keep_for, state::text`;
    await expect(
      db.transaction().execute(async (trx) => {
        await trx.insertInto("orders").values({ code: `WH-${stamp}-F`, customer: "rolled back", due_at: new Date() }).execute();
        const d = await trx.selectFrom("webhook_deliveries").select(["id", "job_id"]).where("endpoint_id", "=", ep.id).executeTakeFirstOrThrow();
        const sentId = await boss.send(QUEUES.webhook, { delivery_id: d.id }, { db: inTrx(trx) });
        expect(sentId).toBeTruthy();
        const byTrigger = (await sql<Row>`select ${cols} from pgboss.job where id = ${d.job_id}`.execute(trx)).rows;
        const bySend = (await sql<Row>`select ${cols} from pgboss.job where id = ${sentId}`.execute(trx)).rows;
        expect(byTrigger).toHaveLength(1);
        expect(byTrigger).toEqual(bySend);
        const cfg = webhookConfig();
        const q = webhookQueueOptions(cfg);
        expect(byTrigger[0]).toMatchObject({ retry_limit: q.retryLimit, retry_delay: q.retryDelay, retry_backoff: true, state: "created" });
        throw new Error("roll back");
      }),
    ).rejects.toThrow("roll back");
  });

  it("exactly one delivery per event with two worker processes, even with every job sent twice", { timeout: 90_000 }, async () => {
    const name = `wh-${stamp}-d`;
    // a slow receiver keeps each worker's pollers busy, so that both workers take some of the jobs
    const ep = await register(name, ["order.created"], { delay_ms: 300 });
    // a second real worker beside the stack's own, against the same database
    const root = path.resolve(import.meta.dirname, "../..");
    const second: Spawned = spawnCollecting(process.execPath, ["--import", "tsx", "worker/index.ts"], { cwd: root, env: { ...process.env, HEARTH_WORKER_POLL_SECONDS: "0.5" } });
    try {
      await waitFor("the second worker", async () => second.output().includes(" ready; queues:"), 30_000);
      // 12 events at once, and a second job for each delivery (as a duplicate pg-boss might hand out)
      const codes = Array.from({ length: 12 }, (_, i) => `WH-${stamp}-D${i}-${randomUUID().slice(0, 4)}`);
      await db.insertInto("orders").values(codes.map((code) => ({ code, customer: "race", due_at: new Date() }))).execute();
      const deliveries = await db.selectFrom("webhook_deliveries").select("id").where("endpoint_id", "=", ep.id).execute();
      expect(deliveries).toHaveLength(12);
      await boss.insert(deliveries.map((d) => ({ name: QUEUES.webhook, data: { delivery_id: d.id } })));
      const got = await waitFor("all 12", async () => {
        const r = await received(name);
        return r.length >= 12 ? r : undefined;
      });
      // every one of the 24 jobs has run, and a duplicate has had time to show up
      await waitFor("all 24 jobs done", async () => {
        const r = await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = ${QUEUES.webhook} and data->>'delivery_id' = any(${deliveries.map((d) => d.id)}::text[]) and state = 'completed'`.execute(db);
        return r.rows[0].n === 24;
      }, 30_000);
      await new Promise((r) => setTimeout(r, 1500));
      const again = await received(name);
      expect(again.length).toBe(12);
      expect(new Set(again.map((d) => d.event_id)).size).toBe(12);
      expect(got.every((d) => d.verified)).toBe(true);
      const rows = await db.selectFrom("webhook_deliveries").select(["state", "attempts"]).where("endpoint_id", "=", ep.id).execute();
      expect(rows.every((r) => r.state === "delivered" && r.attempts === 1)).toBe(true);
      // both workers took jobs: each logs one line per job it ran (worker/job-log.ts)
      const ids = (await sql<{ id: string }>`select id from pgboss.job where name = ${QUEUES.webhook} and data->>'delivery_id' = any(${deliveries.map((d) => d.id)}::text[])`.execute(db)).rows.map((r) => r.id);
      const ran = (log: string) => ids.filter((id) => log.includes(`"job_id":"${id}"`)).length;
      const bySecond = ran(second.output());
      const byStack = ran(readFileSync(path.join(stackLogDir(), "worker.log"), "utf8"));
      expect(bySecond, "jobs the second worker ran").toBeGreaterThan(0);
      expect(byStack, "jobs the stack's worker ran").toBeGreaterThan(0);
      expect(bySecond + byStack).toBe(24);
    } finally {
      await second.stop();
    }
  });

  it("pauses an endpoint that has failed for a day and mails the admin once", async () => {
    const name = `wh-${stamp}-e`;
    const ep = await register(name, ["order.created"], { fail_next: 100, fail_status: 503 });
    await createOrder(`WH-${stamp}-E`);
    const d = await waitFor("a failed attempt", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("endpoint_id", "=", ep.id).executeTakeFirst();
      return r && r.attempts >= 1 && r.state === "pending" ? r : undefined;
    });
    // it has been failing for a day: the next failure pauses it
    await db.updateTable("webhook_endpoints").set({ failing_since: new Date(Date.now() - 25 * 3600_000) }).where("id", "=", ep.id).execute();
    await retryNow(d.id);
    const paused = await waitFor("the pause", async () => {
      const r = await db.selectFrom("webhook_endpoints").selectAll().where("id", "=", ep.id).executeTakeFirstOrThrow();
      return r.paused_at ? r : undefined;
    });
    expect(paused.pause_mailed_at).not.toBeNull();
    const mail = await db.selectFrom("notification_outbox").select(["recipient_email", "subject"]).where("subject_key", "like", `webhook_endpoint:${ep.id}:%`).execute();
    expect(mail).toEqual([{ recipient_email: DEMO.admin, subject: "A webhook endpoint was paused" }]);
    // paused: the job's next retry runs and ends without sending
    const tries = (await received(name)).length;
    expect(tries).toBe(2);
    const job = await retryNow(d.id);
    await waitFor("the retry to end", async () => (await jobsOf(d.id)).find((j) => j.id === job.id && j.state === "completed"));
    expect((await received(name)).length).toBe(tries);
    expect(await db.selectFrom("webhook_deliveries").select(["state", "attempts"]).where("id", "=", d.id).executeTakeFirstOrThrow()).toEqual({ state: "pending", attempts: 2 });
    // resuming clears the pause and sends the waiting delivery a new job; the receiver answers now
    await configure(name, { fail_next: 0 });
    const res = await api(`/api/webhooks/${ep.id}`, { method: "PATCH", cookie: admin, body: { version: paused.version, resume: true } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.endpoint.paused_at).toBeNull();
    const delivered = await waitFor("the delivery after the resume", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("id", "=", d.id).executeTakeFirstOrThrow();
      return r.state === "delivered" ? r : undefined;
    });
    expect(delivered).toMatchObject({ attempts: 3, last_status: 204 });
    expect((await jobsOf(d.id)).map((j) => j.state)).toEqual(["completed", "completed"]);
    const stale = await api(`/api/webhooks/${ep.id}`, { method: "PATCH", cookie: admin, body: { version: paused.version, active: false } });
    expect(stale.status).toBe(409);
  });

  it("a delivery written before the queue existed gets its job from the worker's catch-up, and is sent", async () => {
    const name = `wh-${stamp}-g`;
    const ep = await register(name, ["order.created"]);
    // as send_webhook_job leaves it when pgboss.queue has no deliver-webhook row yet: no job
    const ev = await db.insertInto("webhook_events").values({ type: "order.created", entity: "order", entity_id: randomUUID(), payload: JSON.stringify({ code: `WH-${stamp}-G` }) }).returning("id").executeTakeFirstOrThrow();
    const d = await db.insertInto("webhook_deliveries").values({ event_id: ev.id, endpoint_id: ep.id }).returning(["id", "job_id"]).executeTakeFirstOrThrow();
    expect(d.job_id).toBeNull();
    expect(await sendUnqueuedDeliveries(db, boss)).toBeGreaterThanOrEqual(1);
    const [job] = await jobsOf(d.id);
    expect(job).toBeDefined();
    const got = await waitFor("the delivery", async () => {
      const r = (await received(name)).filter((x) => x.event_id === ev.id);
      return r.length ? r : undefined;
    });
    expect(got).toHaveLength(1);
    const row = await waitFor("the log", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("id", "=", d.id).executeTakeFirstOrThrow();
      return r.state === "delivered" ? r : undefined;
    });
    expect(row.job_id).toBe(job.id);
    // a second pass finds nothing left without a job for it
    await sendUnqueuedDeliveries(db, boss);
    expect(await jobsOf(d.id)).toHaveLength(1);
  });

  it("refuses a bad endpoint with field and reason", async () => {
    const res = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: "ftp://example.test/x", events: ["nope"] } });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors)).toEqual(expect.arrayContaining(["url", "events.0"]));
  });
});
