// The shared reads (app/_server/shared-reads.ts: the board, the unscheduled builds, a unit's
// trace, the floor's window) served from one load per change, on the running app and a second
// instance beside it (two scripts/serve.ts on one database, as behind the cluster's proxy): a page
// that heard of a change and asks again must get the changed answer, from whichever instance its
// request reaches, even when that instance had the old answer cached a moment before; a cached
// answer must never reach someone who may not read it; a browser that holds the current answer
// gets 304 Not Modified, and one that holds an older answer gets the new one.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startApp, stopProcs, waitFor, type Proc } from "../../scripts/stack";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { appUrl } from "../helpers/browser";
import { rawRequest } from "../helpers/raw-request";
import { names, openEventStream, type EventStream } from "../helpers/event-stream";
import { hoursFromNow, makeDraftBuild, makePrinter, retirePrinters } from "../floor/fixtures";
import { makeStation, makeUnits, retireEquipment } from "../batches/fixtures";
import { isStaffedAt, staffingOf } from "@/lib/batches/staffed";

const { db, close } = testDb();
const urlA = appUrl();
// Offset 11 of the slot's spare ports: tests/live/instances.db.test.ts takes 10 (they run one at a time).
const portB = Number(new URL(urlA).port) + 11;
const urlB = `http://127.0.0.1:${portB}`;
let b: Proc;
let tech: string;
let manager: string;
let printer: { id: string };
const stations: string[] = [];
const open: EventStream[] = [];

/** GET on one instance, as a page's query does (gzip accepted, the session cookie). */
async function read(base: string, path: string, cookie: string, headers: Record<string, string> = {}) {
  const res = await fetch(`${base}${path}`, { headers: { cookie, "accept-encoding": "gzip", ...headers } });
  const text = await res.text();
  return { status: res.status, text, etag: res.headers.get("etag"), instance: res.headers.get("x-hearth-instance"), headers: res.headers };
}

async function stream(base: string, cookie: string) {
  const s = await openEventStream(`${base}/api/events`, { cookie });
  open.push(s);
  expect(s.status).toBe(200);
  await s.waitFor((e) => e.event === "ready", 5_000);
  return s;
}

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
  await retireEquipment(db, [], stations);
  await close();
});

describe("shared reads after a change", () => {
  it("a draft build joins and leaves the unscheduled list, and its unit's trace follows, on both instances", async () => {
    const sA = await stream(urlA, manager);
    const sB = await stream(urlB, manager);
    // Both instances hold the list (and a trace) in their caches before the change.
    const before = await Promise.all([read(urlA, "/api/floor/unscheduled", manager), read(urlB, "/api/floor/unscheduled", manager)]);
    for (const r of before) expect(r.status).toBe(200);

    const { build, units } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    // Heard on A's stream, asked of B (and the other way round): each answer shows the draft.
    await sA.waitFor(names("build", build.id), 5_000);
    await sB.waitFor(names("build", build.id), 5_000);
    for (const base of [urlB, urlA]) {
      const r = await read(base, "/api/floor/unscheduled", manager);
      expect(r.status).toBe(200);
      expect(r.instance).toBe(`127.0.0.1:${new URL(base).port}`);
      expect(JSON.parse(r.text).builds.map((x: { id: string }) => x.id)).toContain(build.id);
    }
    const unit = units[0].id;
    const traces = await Promise.all([read(urlA, `/api/units/${unit}/trace`, manager), read(urlB, `/api/units/${unit}/trace`, manager)]);
    for (const t of traces) expect(JSON.parse(t.text).build).toMatchObject({ id: build.id, state: "draft", printer_id: null });

    const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(30).toISOString() } });
    expect(res.status).toBe(200);
    const v = res.body.build.version;
    await sA.waitFor(names("build", build.id, v), 5_000);
    await sB.waitFor(names("build", build.id, v), 5_000);
    for (const base of [urlB, urlA]) {
      const list = await read(base, "/api/floor/unscheduled", manager);
      expect(JSON.parse(list.text).builds.map((x: { id: string }) => x.id)).not.toContain(build.id);
      const trace = await read(base, `/api/units/${unit}/trace`, manager);
      expect(trace.status).toBe(200);
      expect(JSON.parse(trace.text).build).toMatchObject({ id: build.id, state: "scheduled", printer_id: printer.id });
    }
  });

  it("an instance whose cache holds the old answer but has not yet heard of the change still answers the new one (the stamp moved)", async () => {
    // The change is made straight in the database between two reads on B, with no wait for any
    // event: whether or not B's listener has heard of it yet, the change stamp has moved, and B
    // must not answer from the entry it made a moment before.
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const first = await read(urlB, "/api/floor/unscheduled", manager);
    expect(JSON.parse(first.text).builds.map((x: { id: string }) => x.id)).toContain(build.id);
    await db.updateTable("builds").set({ state: "cancelled", version: build.version + 1 }).where("id", "=", build.id).execute();
    const second = await read(urlB, "/api/floor/unscheduled", manager);
    expect(JSON.parse(second.text).builds.map((x: { id: string }) => x.id)).not.toContain(build.id);
  });

  it("a new wash batch reaches every open board, on both instances", async () => {
    const station = await makeStation(db);
    stations.push(station.id);
    const sB = await stream(urlB, manager);
    await Promise.all([read(urlA, "/api/batches", manager), read(urlB, "/api/batches", manager)]);
    const made = await api("/api/wash-batches", { method: "POST", cookie: tech, body: { wash_station_id: station.id } });
    expect(made.status).toBe(201);
    await sB.waitFor(names("wash_batch", made.body.id), 5_000);
    for (const base of [urlA, urlB]) {
      const board = await read(base, "/api/batches", manager);
      expect(board.status).toBe(200);
      expect(board.text).toContain(made.body.id);
    }
  });
});

describe("the board's units waiting for a wash (kept apart while a batch only moves)", () => {
  type Board = { wash_waiting: { id: string }[]; wash_batches: { id: string; starts_at: string | null; units: { id: string }[] }[] };
  const board = async (base: string) => JSON.parse((await read(base, "/api/batches", manager)).text) as Board;
  const waiting = (b: Board) => b.wash_waiting.map((u) => u.id);

  it("a unit put into a batch leaves the list, the batch's move shows at once, and a cancelled batch gives its unit back, on both instances", async () => {
    const station = await makeStation(db, { capacity: 4, load: 50_000 });
    stations.push(station.id);
    // Long overdue: at the head of the list (most at risk first), however many others wait.
    const [unit] = await makeUnits(db, { material: "17-4PH", state: "green", green: [40, 30, 20], mass_g: 60, due: new Date(Date.now() - 30 * 86_400_000) });
    const sA = await stream(urlA, manager);
    for (const base of [urlA, urlB]) expect(waiting(await board(base))).toContain(unit.id);

    const made = await api("/api/wash-batches", { method: "POST", cookie: tech, body: { wash_station_id: station.id } });
    expect(made.status).toBe(201);
    const added = await api(`/api/wash-batches/${made.body.id}/units`, { method: "POST", cookie: tech, body: { version: made.body.version, unit_id: unit.id, unit_version: unit.version } });
    expect(added.status, JSON.stringify(added.body)).toBeLessThan(300);
    await sA.waitFor(names("unit", unit.id), 5_000);
    for (const base of [urlB, urlA]) {
      const b = await board(base);
      expect(waiting(b)).not.toContain(unit.id);
      expect(b.wash_batches.find((w) => w.id === made.body.id)?.units.map((u) => u.id)).toEqual([unit.id]);
    }

    // Booked, then moved an hour on: the list of waiting units is not reloaded for a move, but the
    // batch's own slot on the board is the new one.
    const settings = await db.selectFrom("shop_settings").select(["staffed_hours", "time_zone"]).where("id", "=", 1).executeTakeFirst();
    const staffing = staffingOf(settings?.staffed_hours, settings?.time_zone ?? "UTC");
    let at = hoursFromNow(48).getTime();
    while (!(isStaffedAt(new Date(at), staffing) && isStaffedAt(new Date(at + 3_600_000), staffing))) at += 3_600_000;
    let version = added.body.version ?? made.body.version + 1;
    for (const start of [at, at + 3_600_000]) {
      const moved = await api(`/api/wash-batches/${made.body.id}/schedule`, { method: "PATCH", cookie: tech, body: { version, wash_station_id: station.id, starts_at: new Date(start).toISOString() } });
      expect(moved.status, JSON.stringify(moved.body)).toBe(200);
      version = moved.body.version;
      await sA.waitFor(names("wash_batch", made.body.id, version), 5_000);
      for (const base of [urlB, urlA]) {
        const b = await board(base);
        expect(b.wash_batches.find((w) => w.id === made.body.id)?.starts_at).toBe(new Date(start).toISOString());
        expect(waiting(b)).not.toContain(unit.id);
      }
    }

    // Cancelled: only the batch's state changes, and its unit waits again.
    const cancelled = await api(`/api/wash-batches/${made.body.id}/cancel`, { method: "POST", cookie: tech, body: { version, reason: "test" } });
    expect(cancelled.status, JSON.stringify(cancelled.body)).toBe(200);
    await sA.waitFor(names("wash_batch", made.body.id, cancelled.body.version), 5_000);
    for (const base of [urlB, urlA]) {
      const b = await board(base);
      expect(waiting(b)).toContain(unit.id);
      expect(b.wash_batches.map((w) => w.id)).not.toContain(made.body.id);
    }
  });
});

describe("shared reads and who asks", () => {
  it("answers each role the same body only after its own session check; the signed-out and a forged cookie get 401, never the cached body", async () => {
    for (const path of ["/api/batches", "/api/floor/unscheduled"]) {
      const asTech = await read(urlA, path, tech);
      const asManager = await read(urlA, path, manager);
      expect(asTech.status).toBe(200);
      expect(asManager.status).toBe(200);
      // Neither loader takes the user: the same answer, the same tag.
      expect(asTech.etag).toBe(asManager.etag);
      const anon = await rawRequest(urlA, path, { "accept-encoding": "gzip" });
      expect(anon.status).toBe(401);
      const forged = await read(urlA, path, "hearth_session=Fe26.2**not-a-seal", { "if-none-match": asTech.etag ?? "" });
      expect(forged.status).toBe(401);
      expect(forged.text).not.toContain('"builds"');
    }
  });

  it("a signed-out session is refused at once, though its answer is cached", async () => {
    const cookie = await signIn(DEMO.manager);
    expect((await read(urlA, "/api/batches", cookie)).status).toBe(200);
    const out = await api("/api/session", { method: "DELETE", cookie });
    expect(out.status).toBeLessThan(300);
    expect((await read(urlA, "/api/batches", cookie)).status).toBe(401);
    expect((await read(urlB, "/api/batches", cookie)).status).toBe(401);
  });
});

describe("entity tags", () => {
  it("answers 304 with no body while the answer holds, and the new body once it changed", async () => {
    const path = "/api/floor/unscheduled";
    const first = await read(urlA, path, manager);
    expect(first.status).toBe(200);
    expect(first.etag).toMatch(/^W\/"[A-Za-z0-9_-]+"$/);
    expect(first.headers.get("cache-control")).toBe("private, no-cache");
    const again = await read(urlA, path, manager, { "if-none-match": first.etag! });
    expect(again.status).toBe(304);
    expect(again.text).toBe("");
    expect(again.etag).toBe(first.etag);
    // The other instance computes the same tag for the same answer.
    expect((await read(urlB, path, manager, { "if-none-match": first.etag! })).status).toBe(304);

    const s = await stream(urlA, manager);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    await s.waitFor(names("build", build.id), 5_000);
    const changed = await read(urlA, path, manager, { "if-none-match": first.etag! });
    expect(changed.status).toBe(200);
    expect(changed.etag).not.toBe(first.etag);
    expect(JSON.parse(changed.text).builds.map((x: { id: string }) => x.id)).toContain(build.id);
  });

  it("an unknown unit's trace is the route handler's 404, not a cached answer", async () => {
    const r = await read(urlA, "/api/units/00000000-0000-4000-8000-000000000000/trace", manager);
    expect(r.status).toBe(404);
  });

  it("many people asking at once for an unknown unit's trace all get 404, none a 500", async () => {
    // The web server's direct path and the route handler share one load, and the load's error is
    // made by whichever copy of the code started it; both must still read it as a 404.
    for (let round = 0; round < 5; round += 1) {
      const path = `/api/units/${crypto.randomUUID()}/trace`;
      const answers = await Promise.all(Array.from({ length: 12 }, (_, i) => read(urlA, path, i % 2 ? manager : tech)));
      expect(answers.map((a) => a.status)).toEqual(answers.map(() => 404));
    }
  });
});
