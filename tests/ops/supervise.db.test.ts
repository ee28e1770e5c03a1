// npm start's last step (scripts/run-stack.ts) keeps the shop running when one of its processes
// dies: a SIGKILLed worker is started again while the app goes on answering.
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import { createDb } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { scratchDatabase } from "../helpers/db";
import { spareStackEnv, spawnCollecting, waitUntil, type Spawned } from "../helpers/spare-stack";

let scratch: Awaited<ReturnType<typeof scratchDatabase>>;
let stack: Spawned | undefined;
let dataDir: string;
const env = spareStackEnv(10);
const base = `http://127.0.0.1:${env.PORT}`;

beforeAll(async () => {
  scratch = await scratchDatabase("supervise");
  const { db } = createDb(scratch.url, 2);
  await migrateToLatest(db);
  await db.destroy();
  dataDir = mkdtempSync(path.join(os.tmpdir(), "hearth-supervise-"));
});

afterAll(async () => {
  await stack?.stop();
  await scratch?.drop();
  if (dataDir) rmSync(dataDir, { recursive: true, force: true });
});

const workerPids = (out: string) => [...out.matchAll(/\[worker\] [^\s:]+:(\d+):\w+ ready/g)].map((m) => Number(m[1]));

it("starts a SIGKILLed worker again while the app keeps answering", async () => {
  stack = spawnCollecting(process.execPath, ["--import", "tsx", "scripts/run-stack.ts"], {
    env: { ...process.env, ...env, DATABASE_URL: scratch.url, HEARTH_DATA_DIR: dataDir },
  });
  await waitUntil("the stack is up", async () => stack!.output().includes("Hearth is running"), 120_000, 300).catch((err) => {
    throw new Error(`${err instanceof Error ? err.message : err}; the stack said:\n${stack!.output().split("\n").filter((l) => !l.includes("\"path\":\"/api/health\"")).slice(-40).join("\n")}`);
  });
  const [first] = await waitUntil("the worker is ready", async () => workerPids(stack!.output()).length > 0 && workerPids(stack!.output()), 30_000);

  const killedAt = Date.now();
  process.kill(first, "SIGKILL");

  // The app answers throughout, and a new worker process beats.
  const failures: string[] = [];
  let answers = 0;
  const { db } = createDb(scratch.url, 2);
  try {
    const beat = await waitUntil(
      "a new worker heartbeat",
      async () => {
        try {
          const res = await fetch(`${base}/api/health`, { signal: AbortSignal.timeout(5_000) });
          await res.arrayBuffer();
          answers++;
        } catch (err) {
          failures.push(err instanceof Error ? err.message : String(err));
        }
        return db.selectFrom("worker_heartbeats").select(["pid", "beat_at"]).where("pid", "!=", first).executeTakeFirst();
      },
      60_000,
      250,
    );
    expect(beat.pid).not.toBe(first);
    const ms = Date.now() - killedAt;
    console.log(`[supervise] a new worker beat ${ms} ms after the SIGKILL; the app answered ${answers} health checks meanwhile`);
    // 1 s of back-off plus the worker's own start-up (a few seconds; far more on a loaded machine)
    expect(ms).toBeLessThan(60_000);
  } finally {
    await db.destroy();
  }
  expect(failures).toEqual([]);
  expect(answers).toBeGreaterThan(0);
  expect(stack.child.exitCode).toBeNull();
  expect(stack.output()).toMatch(/worker stopped \(SIGKILL\)/);
  // "up" needs every check, the worker's heartbeat among them (the detail is an admin's)
  expect(await (await fetch(`${base}/api/health`)).json()).toEqual({ status: "up" });
  expect(workerPids(stack.output()).length).toBe(2);
  // the workers' jobs are logged one JSON line each (the heartbeat job runs at start)
  const jobs = stack
    .output()
    .split("\n")
    .map((l) => l.slice(l.indexOf("{")))
    .filter((l) => l.includes('"msg":"job"'))
    .map((l) => JSON.parse(l));
  expect(jobs.find((j) => j.queue === "heartbeat")).toMatchObject({ outcome: "completed", job_id: expect.any(String), ms: expect.any(Number) });
}, 300_000); // the stack starts from scratch (up to 120 s on a loaded machine) before the kill
