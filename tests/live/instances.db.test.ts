// Two web processes on one database, as behind a load balancer: a change made through one is
// heard on the other's event stream, because the database (not the process that made the
// change) announces it. A second scripts/serve.ts on another port of this test slot, from the
// same build (NEXT_DIST_DIR), with the same environment as the first.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startApp, stopProcs, waitFor, type Proc } from "../../scripts/stack";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { appUrl } from "../helpers/browser";
import { names, openEventStream, type EventStream } from "../helpers/event-stream";
import { hoursFromNow, makeDraftBuild, makePrinter, retirePrinters } from "../floor/fixtures";

const { db, close } = testDb();
const portB = Number(new URL(appUrl()).port) + 10;
const urlB = `http://127.0.0.1:${portB}`;
let b: Proc;
let tech: string;
let manager: string;
let printer: { id: string };
const open: EventStream[] = [];

beforeAll(async () => {
  b = startApp(portB, { ...process.env }, !process.env.HEARTH_TEST_VERBOSE);
  [tech, manager] = await Promise.all([signIn(DEMO.technician), signIn(DEMO.manager)]);
  printer = await makePrinter(db, { materials: ["17-4PH"], build: [330, 330, 330] });
  await waitFor(`${urlB}/api/health`, 90_000, (s) => s === 200);
});

afterAll(async () => {
  for (const s of open) s.close();
  if (b) await stopProcs([b]);
  await retirePrinters(db, [printer.id]);
  await close();
});

describe("live updates across app instances", () => {
  it("a booking moved on instance A reaches a stream on instance B within 1 s", async () => {
    // The session cookie is sealed with the shared secret: one sign-in serves both instances.
    const s = await openEventStream(`${urlB}/api/events`, { cookie: manager });
    open.push(s);
    expect(s.status).toBe(200);
    await s.waitFor((e) => e.event === "ready", 5_000);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(36).toISOString() } });
    const answered = performance.now();
    expect(res.status).toBe(200);
    const e = await s.waitFor(names("build", build.id, res.body.build.version), 3_000);
    expect(e.at - answered).toBeLessThan(1_000);
  });

  it("a graceful stop ends open streams at once instead of waiting out the grace period", async () => {
    const s = await openEventStream(`${urlB}/api/events`, { cookie: manager });
    open.push(s);
    await s.waitFor((e) => e.event === "ready", 5_000);
    const t0 = performance.now();
    b.child.kill("SIGTERM");
    await s.ended;
    const code = await b.exited;
    const took = performance.now() - t0;
    expect(code).toBe(0);
    // serve.ts gives requests in flight 5 s; an open stream must not hold the stop that long.
    expect(took).toBeLessThan(3_000);
  });
});
