// Real worker processes (as npm start runs them) against their own scratch database and their
// own mail capture server: kills, restarts, duplicates, two workers, an SMTP outage and a moved
// booking. Each test counts the transitions in the events table and the messages the capture
// server received.
import net from "node:net";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import type PgBoss from "pg-boss";
import { sql } from "kysely";
import { QUEUES } from "@/lib/jobs/queues";
import {
  createWorkerDb,
  insertBuild,
  insertDueBuilds,
  insertRun,
  sendJob,
  sendJobs,
  sleep,
  startCapture,
  startSender,
  startWorker,
  unitStateEvents,
  waitUntil,
  type Capture,
  type WorkerDb,
  type WorkerProc,
} from "./harness";

let capture: Capture;
let current: { w: WorkerDb; boss: PgBoss; workers: WorkerProc[] } | null = null;

beforeAll(async () => {
  capture = await startCapture();
});

afterAll(async () => {
  await capture?.close();
});

afterEach(async () => {
  if (!current) return;
  const { w, boss, workers } = current;
  current = null;
  await Promise.all(workers.map((p) => p.kill("SIGKILL")));
  await boss.stop({ graceful: false, close: true }).catch(() => {});
  await w.drop();
  await capture.clear();
});

async function world(tag: string) {
  const w = await createWorkerDb(tag);
  const boss = await startSender(w.url);
  current = { w, boss, workers: [] };
  return current;
}

async function worker(env: Record<string, string> = {}) {
  const p = await startWorker(current!.w.url, capture, env);
  current!.workers.push(p);
  return p;
}

const pendingOutbox = async (w: WorkerDb) =>
  (await sql<{ n: number }>`select count(*)::int as n from notification_outbox where status <> 'sent'`.execute(w.db)).rows[0].n;

const countBy = <T,>(xs: T[], key: (x: T) => string) => xs.reduce((m, x) => m.set(key(x), (m.get(key(x)) ?? 0) + 1), new Map<string, number>());

// A loaded machine can take a minute and more to start a worker (tests/worker/harness.ts waits 90 s), so the
// tests here, which start one or two and then wait for their work, get more than the usual two minutes.
describe("worker processes", { timeout: 240_000 }, () => {
  it("a furnace run finishing sends exactly one message to each operator and manager and one ready-for-finishing alert per machinist", async () => {
    const { w, boss } = await world("wp_run");
    await worker();
    const run = await insertRun(w.db, w.shop, { ends_at: new Date(Date.now() + 1500), units: 4 });
    await sendJob(w.db, boss, { entity: "furnace_run", id: run.id, version: run.version, due_at: run.ends_at.toISOString() });

    await waitUntil("the run's five messages", async () => (await capture.messages()).length >= 5 && (await pendingOutbox(w)) === 0);
    await sleep(2500); // several sweeps and outbox passes later, still no second copy
    const messages = await capture.messages();
    const u = w.shop.users;
    // One message per person, the right kind for each role.
    expect(messages).toHaveLength(5);
    const byRecipient = countBy(messages, (m) => m.to.join(","));
    for (const who of [u.operator1, u.operator2, u.manager, u.machinist1, u.machinist2]) expect(byRecipient.get(who.email)).toBe(1);
    for (const who of [u.operator1, u.operator2, u.manager]) {
      const m = messages.find((x) => x.to[0] === who.email)!;
      expect(m.subject).toMatch(/^Furnace run R-.* finished on Kiln 0 wp_run: 4 of 4 units ready for finishing$/);
      expect(m.html).toContain("/furnace-runs/");
      expect(m.text).toContain("Outcomes");
    }
    for (const who of [u.machinist1, u.machinist2]) {
      const m = messages.find((x) => x.to[0] === who.email)!;
      expect(m.subject).toMatch(/^Ready for finishing: 4 units of 1 part from furnace run R-/);
      expect(m.text).toContain("Grind datum A flat");
      expect(m.html).toContain("Stock");
    }
    expect(messages.every((m) => m.text.length > 100 && m.html.includes("<table"))).toBe(true);
    expect(new Set(messages.map((m) => m.message_id)).size).toBe(5);
    const ev = await unitStateEvents(w.db, run.unit_ids);
    expect(ev).toHaveLength(8);
  });

  it("the same job delivered twice changes nothing twice and mails once", async () => {
    const { w, boss } = await world("wp_dup");
    const b = await insertBuild(w.db, w.shop, { ends_at: new Date(Date.now() - 60_000), units: 3, state: "running" });
    const job = { entity: "build" as const, id: b.id, version: b.version, due_at: b.ends_at.toISOString() };
    await sendJob(w.db, boss, job);
    // A second copy as pg-boss itself may deliver one (a job handed out again after its worker
    // died): sent straight to the queue, past the superseding that a new booking change does.
    await boss.send(QUEUES.advance, job, { startAfter: new Date(job.due_at), retryLimit: 5 });
    const queued = await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = 'advance-booking' and data->>'id' = ${b.id}`.execute(w.db);
    expect(queued.rows[0].n).toBe(2);
    // Two pollers, batches of one: the two copies are handed out at once.
    await worker({ HEARTH_WORKER_BATCH: "1", HEARTH_WORKER_CONCURRENCY: "2", HEARTH_SWEEP_SECONDS: "30" });

    await waitUntil("both copies handled", async () => {
      const r = await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = 'advance-booking' and data->>'id' = ${b.id} and state = 'completed'`.execute(w.db);
      return r.rows[0].n === 2 && (await capture.messages()).length >= 1;
    });
    await sleep(1500);
    expect(await unitStateEvents(w.db, b.unit_ids)).toHaveLength(3);
    const buildEvents = await w.db.selectFrom("events").select("to_state").where("entity", "=", "build").where("entity_id", "=", b.id).execute();
    expect(buildEvents).toEqual([{ to_state: "complete" }]);
    const messages = await capture.messages(w.shop.users.technician.email);
    expect(messages).toHaveLength(1);
    expect(messages[0].subject).toMatch(/finished/);
  });

  it("two workers on one database never process one transition twice", async () => {
    const { w, boss } = await world("wp_two");
    const n = 120;
    const builds = await insertDueBuilds(w.db, w.shop, n, { ends_at: new Date(Date.now() - 60_000), units: 2 });
    await sendJobs(w.db, boss, "build", builds);
    // Both sweep every half second as well, so jobs and sweeps race for the same bookings.
    await Promise.all([worker({ HEARTH_SWEEP_SECONDS: "0.5" }), worker({ HEARTH_SWEEP_SECONDS: "0.5" })]);

    await waitUntil(
      "every build complete and every message sent",
      async () => {
        const open = await w.db.selectFrom("builds").select("id").where("state", "!=", "complete").execute();
        return open.length === 0 && (await pendingOutbox(w)) === 0 && (await capture.messages()).length >= n;
      },
      60_000,
    );
    await sleep(1500);
    const unitIds = builds.flatMap((b) => b.unit_ids);
    const ev = await unitStateEvents(w.db, unitIds);
    expect(ev).toHaveLength(unitIds.length);
    expect(Math.max(...countBy(ev, (e) => e.entity_id!).values())).toBe(1);
    const bev = await sql<{ n: number; d: number }>`select count(*)::int as n, count(distinct entity_id)::int as d from events where entity = 'build'`.execute(w.db);
    expect(bev.rows[0]).toEqual({ n: n, d: n });
    const messages = await capture.messages();
    expect(messages).toHaveLength(n);
    expect(new Set(messages.map((m) => m.subject)).size).toBe(n);
    // Both workers took part.
    const sweeps = await sql<{ d: number }>`select count(distinct worker_id)::int as d from worker_sweeps`.execute(w.db);
    expect(sweeps.rows[0].d).toBe(2);
  });

  it("SIGKILL in the middle of a batch, then a restart: every transition once, every message delivered, none written twice", async () => {
    const { w, boss } = await world("wp_kill");
    const n = 300;
    const builds = await insertDueBuilds(w.db, w.shop, n, { ends_at: new Date(Date.now() - 60_000), units: 2 });
    await sendJobs(w.db, boss, "build", builds);
    const done = async () => (await sql<{ n: number }>`select count(*)::int as n from builds where state = 'complete'`.execute(w.db)).rows[0].n;

    const first = await worker({ HEARTH_SWEEP_SECONDS: "60", HEARTH_WORKER_BATCH: "10", HEARTH_JOB_EXPIRE_SECONDS: "5" });
    await waitUntil("a third of the builds done", async () => (await done()) >= n / 3, 60_000, 20);
    await first.kill("SIGKILL");
    const atKill = await done();
    expect(atKill).toBeLessThan(n);
    const activeAtKill = (await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = 'advance-booking' and state = 'active'`.execute(w.db)).rows[0].n;

    await worker({ HEARTH_SWEEP_SECONDS: "1", HEARTH_JOB_EXPIRE_SECONDS: "5" });
    await waitUntil(
      "every build complete and every message sent",
      async () => (await done()) === n && (await pendingOutbox(w)) === 0 && (await capture.messages()).length >= n,
      90_000,
    );
    await sleep(2000);
    const unitIds = builds.flatMap((b) => b.unit_ids);
    const ev = await unitStateEvents(w.db, unitIds);
    expect(ev).toHaveLength(unitIds.length);
    expect(Math.max(...countBy(ev, (e) => e.entity_id!).values())).toBe(1);
    const outbox = await sql<{ n: number; sent: number }>`select count(*)::int as n, count(*) filter (where status = 'sent')::int as sent from notification_outbox`.execute(w.db);
    expect(outbox.rows[0]).toEqual({ n, sent: n });
    const messages = await capture.messages();
    // Every message arrived, and no second message was written for any transition.
    const distinct = new Set(messages.map((m) => m.message_id));
    expect(distinct.size).toBe(n);
    const expectedIds = (await w.db.selectFrom("notification_outbox").select("id").execute()).map((r) => r.id);
    expect([...distinct].map((id) => id?.replace(/^<|@.*$/g, "")).sort()).toEqual(expectedIds.sort());
    // SMTP cannot be exactly-once across a crash: a send the relay had accepted when the worker
    // died, before the outbox row was marked sent, goes out again with the same Message-ID. Those
    // are at most the sends in flight at the kill (2 pollers × 3 sends, and the outbox pass's 3).
    const resent = messages.length - distinct.size;
    expect(resent).toBeLessThanOrEqual(9);
    console.log(`[kill test] ${atKill}/${n} builds done at SIGKILL, ${activeAtKill} jobs held by the killed worker, ${resent} message(s) in flight re-sent with their Message-ID`);
  });

  it("SMTP down: messages stay in the outbox, retried with backoff, and go out once when it is back", async () => {
    const { w, boss } = await world("wp_smtp");
    await capture.setDown(true);
    try {
      await worker();
      const run = await insertRun(w.db, w.shop, { ends_at: new Date(Date.now() - 1000), units: 2 });
      await sendJob(w.db, boss, { entity: "furnace_run", id: run.id, version: run.version, due_at: run.ends_at.toISOString() });
      const rows = () => w.db.selectFrom("notification_outbox").select(["status", "attempts", "last_error", "next_attempt_at"]).execute();
      // Not a speed test: on a two-core machine running other suites (a fresh clone's npm start)
      // the first advance can take well over the usual few seconds, so wait as the kill test does.
      // Throwing the rows' state lets waitUntil name it if the wait runs out.
      await waitUntil(
        "five messages tried at least twice",
        async () => {
          const r = await rows();
          if (r.length === 5 && r.every((x) => x.attempts >= 2)) return true;
          throw new Error(`${r.length} row(s), attempts ${r.map((x) => x.attempts).join(",") || "none"}`);
        },
        90_000,
      );
      const held = await rows();
      expect(held.every((r) => r.status === "pending" && r.last_error)).toBe(true);
      expect(await capture.messages()).toHaveLength(0);
      await sleep(1000);
      expect((await rows()).every((r) => r.status === "pending")).toBe(true);
    } finally {
      await capture.setDown(false);
    }
    await waitUntil("all five sent", async () => (await pendingOutbox(w)) === 0, 90_000);
    await sleep(1500);
    const messages = await capture.messages();
    expect(messages).toHaveLength(5);
    expect(new Set(messages.map((m) => m.to[0])).size).toBe(5);
  });

  it("a relay that takes the connection and never answers: no transaction stays open while the worker waits, and the messages wait in the outbox", async () => {
    // The SMTP call must not run inside a database transaction: a hung relay would hold a row
    // lock and a pooled connection for as long as the transport waits (its greeting timeout).
    const held: net.Socket[] = [];
    const mute = net.createServer((sock) => {
      held.push(sock);
      sock.on("error", () => {});
    });
    await new Promise<void>((r) => mute.listen(0, "127.0.0.1", r));
    try {
      const { w, boss } = await world("wp_mute");
      await worker({ SMTP_PORT: String((mute.address() as net.AddressInfo).port) });
      const run = await insertRun(w.db, w.shop, { ends_at: new Date(Date.now() - 1000), units: 2 });
      await sendJob(w.db, boss, { entity: "furnace_run", id: run.id, version: run.version, due_at: run.ends_at.toISOString() });
      const rows = () => w.db.selectFrom("notification_outbox").select(["status", "attempts", "last_error"]).execute();
      await waitUntil("the run's five messages written", async () => (await rows()).length === 5, 60_000);
      await waitUntil("a connection to the mute relay", async () => held.length > 0, 30_000);
      // While the worker waits for a greeting that never comes, no session may sit in an open
      // transaction holding a lock on the outbox (pg-boss's own short transactions are not counted).
      let samples = 0;
      let inTransaction = 0;
      const until = Date.now() + 3000;
      while (Date.now() < until) {
        const r = await sql<{ n: number }>`
          select count(distinct a.pid)::int as n from pg_stat_activity a join pg_locks l on l.pid = a.pid
          where a.datname = current_database() and a.state like 'idle in transaction%'
            and l.relation = 'notification_outbox'::regclass`.execute(w.db);
        samples++;
        inTransaction = Math.max(inTransaction, r.rows[0].n);
        await sleep(50);
      }
      expect(samples).toBeGreaterThan(10);
      expect(inTransaction).toBe(0);
      // The transport gives up (greeting timeout, adapters/mail/transport.ts) and the rows stay pending with the reason.
      await waitUntil("a timed-out attempt recorded", async () => (await rows()).some((x) => x.attempts >= 1), 60_000);
      const after = await rows();
      expect(after.every((x) => x.status === "pending")).toBe(true);
      expect(after.find((x) => x.attempts >= 1)?.last_error).toMatch(/greeting|timeout/i);
      expect(await capture.messages()).toHaveLength(0);
    } finally {
      for (const sock of held) sock.destroy();
      await new Promise<void>((r) => mute.close(() => r()));
    }
  });

  it("a moved booking advances at its new end, not its old one; a cancelled one never", async () => {
    const { w, boss } = await world("wp_move");
    await worker();
    const t0 = Date.now();
    const b = await insertBuild(w.db, w.shop, { ends_at: new Date(t0 + 2500), units: 2 });
    await sendJob(w.db, boss, { entity: "build", id: b.id, version: b.version, due_at: b.ends_at.toISOString() });
    const gone = await insertBuild(w.db, w.shop, { ends_at: new Date(t0 + 2500), units: 1, printer: 1 });
    await sendJob(w.db, boss, { entity: "build", id: gone.id, version: gone.version, due_at: gone.ends_at.toISOString() });

    // Moved five seconds later, the way the floor does it: new end, new version, new job, one transaction.
    const newEnd = new Date(t0 + 7500);
    await w.db.transaction().execute(async (trx) => {
      const row = await trx
        .updateTable("builds")
        .set({ ends_at: newEnd, version: sql`version + 1` })
        .where("id", "=", b.id)
        .returning(["version"])
        .executeTakeFirstOrThrow();
      await trx.updateTable("builds").set({ state: "cancelled", version: sql`version + 1` }).where("id", "=", gone.id).execute();
      const { sendAdvance } = await import("@/db/jobs/advance");
      await sendAdvance(boss, trx, { entity: "build", id: b.id, version: row.version, due_at: newEnd.toISOString() });
    });

    await sleep(Math.max(0, t0 + 5000 - Date.now()));
    const mid = await w.db.selectFrom("builds").select(["state"]).where("id", "=", b.id).executeTakeFirstOrThrow();
    expect(mid.state).toBe("scheduled");
    const oldJob = await sql<{ state: string }>`select state from pgboss.job where name = 'advance-booking' and data->>'id' = ${b.id} and (data->>'version')::int = ${b.version}`.execute(w.db);
    expect(oldJob.rows).toEqual([]); // superseded: deleted by the move that sent the new job

    await waitUntil("the moved build complete", async () => (await w.db.selectFrom("builds").select("state").where("id", "=", b.id).executeTakeFirstOrThrow()).state === "complete", 15_000);
    const ev = await w.db.selectFrom("events").select(["created_at"]).where("entity", "=", "build").where("entity_id", "=", b.id).execute();
    expect(ev).toHaveLength(1);
    expect(ev[0].created_at.getTime()).toBeGreaterThanOrEqual(newEnd.getTime());
    expect((await unitStateEvents(w.db, b.unit_ids)).every((e) => e.to_state === "green")).toBe(true);
    await sleep(1500);
    const cancelled = await w.db.selectFrom("builds").select("state").where("id", "=", gone.id).executeTakeFirstOrThrow();
    expect(cancelled.state).toBe("cancelled");
    expect(await unitStateEvents(w.db, gone.unit_ids)).toHaveLength(0);
  });

  it("stops gracefully on SIGTERM and removes its heartbeat", async () => {
    const { w } = await world("wp_term");
    const p = await worker();
    await waitUntil("a heartbeat", async () => (await w.db.selectFrom("worker_heartbeats").select("worker_id").execute()).length === 1);
    p.child.kill("SIGTERM");
    const code = await p.exited;
    expect(code, `exit ${code} (signal ${p.child.signalCode}); the worker printed:\n${p.logs.join("")}`).toBe(0);
    expect(await w.db.selectFrom("worker_heartbeats").select("worker_id").execute()).toHaveLength(0);
  });
});
