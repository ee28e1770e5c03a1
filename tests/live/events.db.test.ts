// Live updates on the running app (scripts/serve.ts in front of Next.js) and the real test
// database: GET /api/events as one person, a booking changed through the API by another, and
// the worker's own transitions, all announced by the database (migration 202612040510).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { gunzipSync } from "node:zlib";
import type PgBoss from "pg-boss";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { appUrl } from "../helpers/browser";
import { rawRequest } from "../helpers/raw-request";
import { changesOf, names, openEventStream, type EventStream } from "../helpers/event-stream";
import { hoursFromNow, makeDraftBuild, makePrinter, retirePrinters } from "../floor/fixtures";
import { sendJob, startSender } from "../worker/harness";

const { db, close } = testDb();
let tech: string;
let manager: string;
let admin: string;
let printer: { id: string };
const open: EventStream[] = [];

const events = async (cookie?: string, headers: Record<string, string> = {}) => {
  const s = await openEventStream(`${appUrl()}/api/events`, { ...(cookie ? { cookie } : {}), ...headers });
  open.push(s);
  return s;
};
/** The stream is registered once its first event (ready) has arrived. */
const ready = (s: EventStream) => s.waitFor((e) => e.event === "ready" || e.event === "resync", 5_000);

beforeAll(async () => {
  [tech, manager, admin] = await Promise.all([signIn(DEMO.technician), signIn(DEMO.manager), signIn(DEMO.admin)]);
  printer = await makePrinter(db, { materials: ["17-4PH"], build: [330, 330, 330] });
});

afterAll(async () => {
  for (const s of open) s.close();
  await retirePrinters(db, [printer.id]);
  await close();
});

describe("GET /api/events", () => {
  it("refuses a signed-out visitor and a forged cookie with 401, as the pages would", async () => {
    const anon = await events();
    expect(anon.status).toBe(401);
    const forged = await events("hearth_session=Fe26.2**not-a-seal");
    expect(forged.status).toBe(401);
  });

  it("streams unbuffered and uncompressed: event-stream type, no-transform, nginx told not to buffer, a retry hint first", async () => {
    const s = await events(manager, { "accept-encoding": "gzip, br" });
    expect(s.status).toBe(200);
    expect(s.headers.get("content-type")).toMatch(/^text\/event-stream/);
    expect(s.headers.get("cache-control")).toBe("no-cache, no-transform");
    expect(s.headers.get("x-accel-buffering")).toBe("no");
    expect(s.headers.get("content-encoding")).toBeNull();
    await ready(s);
    expect(s.retry).toBeGreaterThan(0);
    s.close();
  });

  it("tells a manager of a booking a technician moves within 1 s: entity, id and the new version", async () => {
    const s = await events(manager);
    await ready(s);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const sent = performance.now();
    const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(30).toISOString() } });
    const answered = performance.now();
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const version = res.body.build.version as number;
    const e = await s.waitFor(names("build", build.id, version), 3_000);
    // Within a second of the change being committed (the API's answer comes after the commit).
    expect(e.at - answered).toBeLessThan(1_000);
    expect(e.at - sent).toBeLessThan(1_000 + (answered - sent));
    // The units booked with it are announced in the same group, ids and versions only (and a
    // build's state, migration 202612041152).
    const items = changesOf(e);
    expect(items.every((c) => Object.keys(c).every((k) => ["e", "id", "v", "unit", "s"].includes(k)))).toBe(true);
    expect(items.find((c) => c.id === build.id)).toEqual({ e: "build", id: build.id, v: version, s: "scheduled" });
    expect(e.data.length).toBeLessThan(8_000);
  });

  it("replays what a page missed when it comes back with Last-Event-ID, and tells an unknown id to resync", async () => {
    const first = await events(manager);
    const hello = await ready(first);
    first.close();
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(40).toISOString() } });
    expect(res.status).toBe(200);
    await new Promise((r) => setTimeout(r, 300));
    const again = await events(manager, { "last-event-id": hello.id! });
    await again.waitFor(names("build", build.id, res.body.build.version), 2_000);
    const stranger = await events(manager, { "last-event-id": "elsewhere-12" });
    await stranger.waitFor((e) => e.event === "resync", 2_000);
  });

  it("announces the worker's own transition: a build whose end has passed turns complete", async () => {
    const s = await events(tech);
    await ready(s);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const booked = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(60).toISOString() } });
    expect(booked.status).toBe(200);
    // The print ran and ended a minute ago; the worker is asked to advance it now.
    const ends = new Date(Date.now() - 60_000);
    const row = await db
      .updateTable("builds")
      .set((eb) => ({ state: "running", starts_at: new Date(ends.getTime() - 3_600_000), ends_at: ends, version: eb("version", "+", 1) }))
      .where("id", "=", build.id)
      .returning("version")
      .executeTakeFirstOrThrow();
    await db.updateTable("units").set({ state: "printing" }).where("build_id", "=", build.id).execute();
    let boss: PgBoss | undefined;
    try {
      boss = await startSender(process.env.DATABASE_URL!);
      await sendJob(db, boss, { entity: "build", id: build.id, version: row.version, due_at: ends.toISOString() });
      const e = await s.waitFor(names("build", build.id, row.version + 1), 20_000);
      expect(changesOf(e).find((c) => c.id === build.id)).toEqual({ e: "build", id: build.id, v: row.version + 1, s: "complete" });
      const after = await db.selectFrom("builds").select(["state", "version"]).where("id", "=", build.id).executeTakeFirstOrThrow();
      expect(after).toEqual({ state: "complete", version: row.version + 1 });
    } finally {
      await boss?.stop({ graceful: false, close: true });
    }
  });

  it("counts this process's open streams in the health detail, for an admin only", async () => {
    const s = await events(admin);
    await ready(s);
    const detail = await api("/api/health", { cookie: admin });
    expect(detail.body.live.open_streams).toBeGreaterThanOrEqual(1);
    expect(detail.body.live.listening).toBe("listening");
    const before = detail.body.live.open_streams as number;
    s.close();
    // The server hears the abort and lets the stream go.
    let after = before;
    for (let i = 0; i < 20 && after >= before; i++) {
      await new Promise((r) => setTimeout(r, 100));
      after = (await api("/api/health", { cookie: admin })).body.live.open_streams;
    }
    expect(after).toBeLessThan(before);
    const plain = await api("/api/health", { cookie: tech });
    expect(plain.body.live).toBeUndefined();
    expect((await api("/api/health")).body.live).toBeUndefined();
  });

  it("still answers the floor's window through the shared rule after a change: fresh data at once, no stale cache", async () => {
    const from = hoursFromNow(70);
    const to = hoursFromNow(90);
    const path = `/api/floor?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`;
    const before = await rawRequest(appUrl(), path, { cookie: tech, "accept-encoding": "gzip" });
    expect(before.status).toBe(200);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 1 });
    const s = await events(tech);
    await ready(s);
    const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(75).toISOString() } });
    expect(res.status).toBe(200);
    await s.waitFor(names("build", build.id), 2_000);
    const after = await rawRequest(appUrl(), path, { cookie: tech, "accept-encoding": "gzip" });
    const body = JSON.parse((after.headers["content-encoding"] === "gzip" ? gunzipSync(after.bytes) : after.bytes).toString()) as { events: { id: string }[] };
    expect(body.events.map((e) => e.id)).toContain(build.id);
  });
});
