// `git clone … && npm start` from a folder other users cannot enter (root's home is 0700, so is a
// mktemp -d folder): the private PostgreSQL cluster must still start (as root it runs as the
// postgres user, which cannot reach the clone), the app must answer and sign in, and the build
// must leave the checkout clean (Next.js rewrites tsconfig.json's include list when it can).
// node_modules is hard-linked from this checkout to spare the install; everything else is real:
// the build, the cluster, the fakes, the worker. About 3–6 minutes, most of it `next build`.
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, expect, it } from "vitest";
import { DEMO_PASSWORD } from "@/db/seed-users";
import { spareStackEnv, spawnCollecting, waitUntil, type Spawned } from "../helpers/spare-stack";

const repo = path.resolve(import.meta.dirname, "../..");
const slot = Number(process.env.HEARTH_TEST_SLOT ?? 0);
const pgPort = String(54340 + slot);
const ports = spareStackEnv(15);
const base = `http://127.0.0.1:${ports.PORT}`;
const isRoot = process.getuid?.() === 0;

let tmp: string | undefined;
let clone: string;
let stack: Spawned | undefined;
let clusterHomes: string[] = [];

// A plain login environment: nothing of the test run's own database, build or ports leaks in.
const cloneEnv = (): NodeJS.ProcessEnv => ({
  PATH: process.env.PATH,
  HOME: process.env.HOME,
  LANG: process.env.LANG ?? "C.UTF-8",
  NODE_ENV: "production", // as npm start sets it
  ...ports,
  HEARTH_PG_PORT: pgPort,
});

afterAll(async () => {
  await stack?.stop(30_000);
  if (clone && fs.existsSync(path.join(clone, "scripts/pg.sh"))) {
    try {
      clusterHomes = execFileSync("bash", ["scripts/pg.sh", "where"], { cwd: clone, env: cloneEnv(), encoding: "utf8" }).trim().split("\n");
      execFileSync("bash", ["scripts/pg.sh", "stop"], { cwd: clone, env: cloneEnv(), stdio: "ignore" });
    } catch {
      // nothing was started
    }
  }
  // A cluster kept outside the clone (root) goes with it.
  for (const home of clusterHomes) if (home.startsWith("/var/lib/hearth/")) fs.rmSync(path.dirname(home), { recursive: true, force: true });
  if (tmp) fs.rmSync(tmp, { recursive: true, force: true });
}, 120_000);

it("starts from a fresh clone in a 0700 folder and leaves the checkout clean", { timeout: 20 * 60_000 }, async () => {
  tmp = fs.mkdtempSync(path.join(os.tmpdir(), "hearth-clone-"));
  expect(fs.statSync(tmp).mode & 0o777).toBe(0o700);
  clone = path.join(tmp, "hearth");
  const head = execFileSync("git", ["-C", repo, "rev-parse", "HEAD"], { encoding: "utf8" }).trim();
  execFileSync("git", ["clone", "--quiet", "--no-checkout", repo, clone]);
  execFileSync("git", ["-C", clone, "checkout", "--quiet", "--detach", head]);
  execFileSync("cp", ["-al", path.join(repo, "node_modules"), path.join(clone, "node_modules")]);
  // the lock file is older than the installed modules, so npm start does not reinstall them; a
  // second older, because utimes takes milliseconds and rounding can land after the install's time
  const installed = new Date(fs.statSync(path.join(repo, "node_modules/.package-lock.json")).mtimeMs - 1000);
  fs.utimesSync(path.join(clone, "package-lock.json"), installed, installed);

  const started = Date.now();
  stack = spawnCollecting("npm", ["start"], { cwd: clone, env: cloneEnv() });
  await Promise.race([
    waitUntil("the stack is up", async () => stack!.output().includes("Hearth is running"), 18 * 60_000, 1_000),
    stack.exited.then((code) => {
      throw new Error(`npm start stopped (${code}):\n${stack!.output().slice(-4000)}`);
    }),
  ]);
  console.log(`[clone-start] npm start in a fresh clone answered after ${Math.round((Date.now() - started) / 1000)} s`);

  clusterHomes = execFileSync("bash", ["scripts/pg.sh", "where"], { cwd: clone, env: cloneEnv(), encoding: "utf8" }).trim().split("\n");
  if (isRoot) {
    // out of the 0700 folder, owned by the server user
    expect(clusterHomes[0].startsWith(tmp)).toBe(false);
    expect(fs.existsSync(path.join(clusterHomes[0], "data/PG_VERSION"))).toBe(true);
    expect(execFileSync("stat", ["-c", "%U", path.join(clusterHomes[0], "data")], { encoding: "utf8" }).trim()).toBe("postgres");
    expect(fs.readFileSync(path.join(clone, ".data/pg.location"), "utf8").trim()).toBe(clusterHomes[0]);
  } else {
    expect(clusterHomes[0]).toBe(path.join(clone, ".data/pg"));
  }

  const health = await fetch(`${base}/api/health`);
  expect(health.status).toBe(200);
  // the public answer is up or down only (the checks are an admin's)
  expect(await health.json()).toEqual({ status: "up" });
  const signIn = await fetch(`${base}/api/session`, {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify({ email: "admin@demo.hearth.test", password: DEMO_PASSWORD }),
  });
  expect(signIn.status).toBe(200);
  const cookie = signIn.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))!.split(";")[0];
  const me = await fetch(`${base}/api/me`, { headers: { cookie } });
  expect(me.status).toBe(200);

  // The build did not touch tracked files (tsconfig.json above all).
  expect(execFileSync("git", ["-C", clone, "status", "--porcelain", "tsconfig.json"], { encoding: "utf8" })).toBe("");
  expect(execFileSync("git", ["-C", clone, "status", "--porcelain", "--untracked-files=no"], { encoding: "utf8" })).toBe("");
});
