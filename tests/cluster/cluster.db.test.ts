// Two app instances and two workers behind nginx (deploy/nginx/hearth.conf, scripts/cluster.ts)
// on a scratch database of their own: sign-in through the proxy, requests spread over both
// instances, a change made through one seen through the other, each job run once, and an
// instance killed mid-traffic losing no GET and no written change.
import { countLiveWorkers } from "@/db/health/reads";
import { mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type PgBoss from "pg-boss";
import { hashPassword } from "@/lib/auth/password";
import { startCluster, type Cluster } from "../../scripts/cluster";
import { createWorkerDb, insertBuild, insertDueBuilds, sendJobs, startSender, unitStateEvents, waitUntil, type WorkerDb } from "../worker/harness";

// Ports of this file's own (the test slots use 3100-3299).
const PROXY = 3530;
const APPS = [3531, 3532];
const PASSWORD = "cluster-test-password-1";

let w: WorkerDb;
let boss: PgBoss;
let cluster: Cluster;
let dir: string;
let cookie: string;

beforeAll(async () => {
  w = await createWorkerDb("cluster");
  await w.db.updateTable("users").set({ password_hash: await hashPassword(PASSWORD) }).where("id", "=", w.shop.users.technician.id).execute();
  await w.db.insertInto("printer_materials").values(w.shop.printer_ids.map((printer_id) => ({ printer_id, material_id: w.shop.material_id }))).execute();
  boss = await startSender(w.url);
  dir = await mkdtemp(path.join(os.tmpdir(), "hearth-nginx-"));
  cluster = await startCluster({
    proxyPort: PROXY,
    appPorts: APPS,
    workers: 2,
    dir,
    fakes: false, // the test stack's mail and S3 fakes are already running
    quiet: !process.env.HEARTH_TEST_VERBOSE,
    env: { ...process.env, DATABASE_URL: w.url, APP_URL: `http://127.0.0.1:${PROXY}`, HEARTH_WORKER_POLL_SECONDS: "0.5", HEARTH_SWEEP_SECONDS: "600", HEARTH_WORKER_QUIET: "1", DB_POOL_MAX: "5" },
  });
  const res = await fetch(`${cluster.url}/api/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: w.shop.users.technician.email, password: PASSWORD }) });
  expect(res.status, await res.clone().text()).toBe(200);
  cookie = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))!.split(";")[0];
}, 240_000);

afterAll(async () => {
  await cluster?.stop();
  await boss?.stop({ graceful: false, close: true }).catch(() => {});
  await w?.drop();
  if (dir) await rm(dir, { recursive: true, force: true });
});

const get = (base: string, p: string) => fetch(`${base}${p}`, { headers: { cookie } });

describe("nginx in front of two app instances and two workers", () => {
  it("spreads signed-in requests over both instances, each naming itself", async () => {
    const seen = new Map<string, number>();
    for (let i = 0; i < 12; i++) {
      const res = await get(cluster.url, "/api/orders");
      expect(res.status).toBe(200);
      await res.arrayBuffer();
      const name = res.headers.get("x-hearth-instance") ?? "none";
      seen.set(name, (seen.get(name) ?? 0) + 1);
    }
    expect([...seen.keys()].sort()).toEqual(["app-1", "app-2"]);
    // The public answer is up or down only; the two workers' heartbeats are read from the database.
    const health = await fetch(`${cluster.url}/api/health`);
    expect(health.status).toBe(200);
    expect((await health.json()).status).toBe("up");
    expect(await countLiveWorkers(w.db, 60)).toBeGreaterThanOrEqual(2);
  });

  it("a schedule change made through one instance is seen through the other", async () => {
    const build = await insertBuild(w.db, w.shop, { ends_at: new Date(Date.now() + 72 * 3_600_000) });
    const starts = new Date(Date.now() + 100 * 3_600_000);
    starts.setUTCMinutes(0, 0, 0);
    const patch = await fetch(`http://127.0.0.1:${APPS[0]}/api/builds/${build.id}/schedule`, {
      method: "PATCH",
      headers: { cookie, "content-type": "application/json" },
      body: JSON.stringify({ version: build.version, printer_id: w.shop.printer_ids[1], starts_at: starts.toISOString() }),
    });
    expect(patch.status, await patch.clone().text()).toBe(200);
    expect(patch.headers.get("x-hearth-instance")).toBe("app-1");
    const other = await get(`http://127.0.0.1:${APPS[1]}`, `/api/builds/${build.id}`);
    expect(other.headers.get("x-hearth-instance")).toBe("app-2");
    const body = await other.json();
    expect(body.build.printer_id).toBe(w.shop.printer_ids[1]);
    expect(new Date(body.build.starts_at).toISOString()).toBe(starts.toISOString());
    expect(body.build.version).toBe(build.version + 1);
  });

  it("two workers run each of 40 jobs once: one advance per build, two unit transitions each", async () => {
    const builds = await insertDueBuilds(w.db, w.shop, 40, { ends_at: new Date(Date.now() - 60_000), units: 2 });
    await sendJobs(w.db, boss, "build", builds);
    const ids = builds.map((b) => b.id);
    await waitUntil("every build advanced", async () => {
      const open = await w.db.selectFrom("builds").select("id").where("id", "in", ids).where("state", "!=", "complete").execute();
      return open.length === 0;
    }, 60_000);
    const units = builds.flatMap((b) => b.unit_ids);
    const events = await unitStateEvents(w.db, units);
    expect(events).toHaveLength(units.length);
    expect(new Set(events.map((e) => e.entity_id)).size).toBe(units.length);
    const buildEvents = await w.db.selectFrom("events").select(["entity_id", "data"]).where("entity", "=", "build").where("entity_id", "in", ids).where("kind", "=", "state").execute();
    expect(buildEvents).toHaveLength(40);
    const jobs = await boss.fetch("advance-booking", { batchSize: 100 });
    expect(jobs ?? []).toHaveLength(0);
  });

  it("killing one instance mid-traffic loses no GET and no written change", async () => {
    const build = await insertBuild(w.db, w.shop, { ends_at: new Date(Date.now() + 200 * 3_600_000), printer: 0 });
    let version = build.version;
    const statuses: number[] = [];
    const written: number[] = [];
    let killed = false;
    const cut: string[] = [];
    const reader = async () => {
      for (let i = 0; i < 60; i++) {
        // An answer already under way from the instance when it is killed cannot be moved to the
        // other one by the proxy (bytes went out); the client is cut and asks again, as any client
        // would. That may happen once per reader, at the kill, never otherwise.
        let res: Response;
        let body: ArrayBuffer;
        try {
          res = await get(cluster.url, `/api/builds/${build.id}`);
          body = await res.arrayBuffer();
        } catch (err) {
          cut.push(`${i} ${killed} ${err instanceof Error ? err.message : err}`);
          res = await get(cluster.url, `/api/builds/${build.id}`);
          body = await res.arrayBuffer();
        }
        expect(body.byteLength).toBeGreaterThan(0);
        statuses.push(res.status);
        if (i === 20 && !killed) {
          killed = true;
          cluster.apps[0].child.kill("SIGKILL");
        }
      }
    };
    const writer = async () => {
      for (let i = 0; i < 10; i++) {
        const starts = new Date(Date.now() + (300 + i) * 3_600_000);
        const res = await fetch(`${cluster.url}/api/builds/${build.id}/schedule`, {
          method: "PATCH",
          headers: { cookie, "content-type": "application/json" },
          body: JSON.stringify({ version, printer_id: w.shop.printer_ids[0], starts_at: starts.toISOString() }),
        });
        const body = await res.json().catch(() => null);
        if (res.status === 200) {
          version = body.build.version;
          written.push(version);
        } else {
          // Only the instance going away may refuse a change, and the change is then not made.
          expect([502, 504]).toContain(res.status);
          const row = await w.db.selectFrom("builds").select("version").where("id", "=", build.id).executeTakeFirstOrThrow();
          version = row.version;
        }
      }
    };
    await Promise.all([reader(), reader(), writer()]);
    expect(killed).toBe(true);
    expect(statuses.filter((s) => s !== 200)).toEqual([]);
    expect(statuses).toHaveLength(120);
    expect(cut.length, cut.join("; ")).toBeLessThanOrEqual(2);
    expect(cut.every((c) => c.split(" ")[1] === "true"), cut.join("; ")).toBe(true);
    const row = await w.db.selectFrom("builds").select("version").where("id", "=", build.id).executeTakeFirstOrThrow();
    expect(row.version).toBe(version);
    expect(written.length).toBeGreaterThanOrEqual(8);
    const changes = await w.db.selectFrom("events").select("id").where("entity", "=", "build").where("entity_id", "=", build.id).execute();
    expect(changes.length).toBeGreaterThanOrEqual(written.length);
    // After the kill every answer comes from the instance still running.
    const after = await get(cluster.url, "/api/orders");
    expect(after.headers.get("x-hearth-instance")).toBe("app-2");
  });
});
