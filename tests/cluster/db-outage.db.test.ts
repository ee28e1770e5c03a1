// A database outage on a running app instance and worker: a PostgreSQL cluster of this file's
// own is stopped mid-test. While it is down the app answers 503 with Retry-After (never a
// 500), neither process dies of a dropped connection, and both carry on once it is back.
import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { chmod, chown, mkdtemp, rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { createDb } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { hashPassword } from "@/lib/auth/password";
import { startApp, startProc, waitFor, type Proc } from "../../scripts/stack";
import { seedShop, waitUntil } from "../worker/harness";

const PG_BIN = process.env.HEARTH_PG_BIN ?? "/usr/lib/postgresql/15/bin";
const PG_PORT = 3550;
const APP = 3551;
const PASSWORD = "outage-test-password-1";

let dir: string;
let app: Proc;
let worker: Proc;
const logs: string[] = [];
const url = `postgres://postgres@127.0.0.1:${PG_PORT}/hearth`;
const asRoot = process.getuid?.() === 0;

function pg(cmd: string, args: string[]) {
  const file = path.join(PG_BIN, cmd);
  return asRoot ? execFileSync("runuser", ["-u", "postgres", "--", file, ...args], { stdio: "pipe" }) : execFileSync(file, args, { stdio: "pipe" });
}
const pgStart = () => pg("pg_ctl", ["-D", path.join(dir, "data"), "-l", path.join(dir, "server.log"), "-w", "-t", "30", "-o", `-p ${PG_PORT} -k ${dir} -c listen_addresses=127.0.0.1 -c fsync=off`, "start"]);
const pgStop = () => pg("pg_ctl", ["-D", path.join(dir, "data"), "-m", "fast", "-w", "stop"]);

const capture = (p: Proc) => {
  p.child.stdout?.on("data", (d: Buffer) => logs.push(d.toString()));
  p.child.stderr?.on("data", (d: Buffer) => logs.push(d.toString()));
  return p;
};

beforeAll(async () => {
  if (!existsSync(path.join(PG_BIN, "initdb"))) throw new Error(`PostgreSQL binaries not found in ${PG_BIN}`);
  dir = await mkdtemp(path.join(os.tmpdir(), "hearth-outage-"));
  if (asRoot) {
    await chown(dir, Number(execFileSync("id", ["-u", "postgres"]).toString().trim()), 0);
    await chmod(dir, 0o700);
  }
  pg("initdb", ["-D", path.join(dir, "data"), "-U", "postgres", "--auth=trust", "--encoding=UTF8", "--locale=C.UTF-8"]);
  pgStart();
  const admin = createDb(`postgres://postgres@127.0.0.1:${PG_PORT}/postgres`, 1);
  await admin.pool.query("create database hearth");
  await admin.db.destroy();
  const { db } = createDb(url, 2);
  await migrateToLatest(db);
  const shop = await seedShop(db, "outage", {});
  await db.updateTable("users").set({ password_hash: await hashPassword(PASSWORD) }).where("id", "=", shop.users.technician.id).execute();
  await db.destroy();
  const env = { ...process.env, DATABASE_URL: url, DB_CONNECT_TIMEOUT_MS: "2000", HEARTH_WORKER_POLL_SECONDS: "0.5", HEARTH_SWEEP_SECONDS: "2" };
  worker = capture(startProc("worker", process.execPath, ["--import", "tsx", "worker/index.ts"], env, true));
  app = capture(startApp(APP, env, true));
  await waitFor(`http://127.0.0.1:${APP}/api/health`, 90_000, (s) => s === 200);
  email = shop.users.technician.email;
}, 180_000);

let email = "";

afterAll(async () => {
  for (const p of [app, worker]) if (p && p.child.exitCode === null) p.child.kill("SIGKILL");
  if (dir) {
    try {
      pgStop();
    } catch {
      /* already stopped */
    }
    await rm(dir, { recursive: true, force: true });
  }
});

const base = `http://127.0.0.1:${APP}`;

describe("the database goes away and comes back", () => {
  it("answers 503 with Retry-After while it is down, no process dies, and all works again after", async () => {
    const session = await fetch(`${base}/api/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email, password: PASSWORD }) });
    expect(session.status).toBe(200);
    const cookie = session.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))!.split(";")[0];
    const orders = () => fetch(`${base}/api/orders`, { headers: { cookie }, signal: AbortSignal.timeout(15_000) });
    expect((await orders()).status).toBe(200);

    pgStop();
    const down = await orders();
    expect(down.status).toBe(503);
    expect(down.headers.get("retry-after")).toBe("5");
    expect((await down.json()).error.code).toBe("unavailable");
    const signIn = await fetch(`${base}/api/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email, password: PASSWORD }) });
    expect(signIn.status).toBe(503);
    expect(signIn.headers.get("retry-after")).toBe("5");
    const t0 = Date.now();
    const health = await fetch(`${base}/api/health`, { signal: AbortSignal.timeout(15_000) });
    expect(health.status).toBe(503);
    expect(Date.now() - t0).toBeLessThan(6_000);
    // The worker's heartbeats, polls and sweeps fail for a while.
    await new Promise((r) => setTimeout(r, 3_000));
    expect(app.child.exitCode).toBeNull();
    expect(worker.child.exitCode).toBeNull();

    pgStart();
    await waitUntil("the app answers again", async () => (await orders()).status === 200, 30_000, 500);
    await waitFor(`${base}/api/health`, 40_000, (s) => s === 200);
    expect(app.child.exitCode).toBeNull();
    expect(worker.child.exitCode).toBeNull();
    const all = logs.join("");
    expect(all).not.toMatch(/uncaught|unhandled/i);
    expect(all).not.toMatch(/\[api\] unexpected error/);
  });
});
