import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { listUnscheduledBuilds } from "@/db/floor/reads";
import { hoursFromNow, makeBuild, makeDraftBuild, makeOrder, makePart, makePrinter, overlapsOn, retirePrinters, unitsOf } from "./fixtures";

// PATCH /api/builds/[id]/schedule against the running app: book, move, reassign, and every
// way a booking is refused (overlap, stale version, incompatible printer, maintenance, bad body).

const { db, close } = testDb();
let tech: string;
const printers: string[] = [];
let wide: { id: string; name: string };
let second: { id: string; name: string };
let small: { id: string; name: string };
let other: { id: string; name: string };

const schedule = (id: string, body: unknown, cookie = tech) => api(`/api/builds/${id}/schedule`, { method: "PATCH", cookie, body });

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
  wide = await makePrinter(db, { materials: ["17-4PH", "316L"], build: [300, 250, 200], rate: 20 });
  second = await makePrinter(db, { materials: ["17-4PH"], build: [300, 250, 200], rate: 40 });
  small = await makePrinter(db, { materials: ["17-4PH"], build: [60, 60, 30], rate: 20 });
  other = await makePrinter(db, { materials: ["H13"], build: [300, 250, 200], rate: 20 });
  printers.push(wide.id, second.id, small.id, other.id);
});

afterAll(async () => {
  await retirePrinters(db, printers);
  await close();
});

describe("scheduling a build", () => {
  it("books a draft onto a printer; the end follows from the printer's print time and an advance job is queued in the same transaction", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 2 });
    const start = hoursFromNow(48);
    const res = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: start.toISOString() });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.build.state).toBe("scheduled");
    expect(res.body.build.printer_id).toBe(wide.id);
    expect(res.body.build.version).toBe(build.version + 1);
    const minutes = res.body.build.est_minutes;
    expect(minutes).toBeGreaterThan(0);
    expect(new Date(res.body.build.ends_at).getTime() - start.getTime()).toBe(minutes * 60_000);
    const row = await db.selectFrom("builds").select(["plate_layout", "state"]).where("id", "=", build.id).executeTakeFirstOrThrow();
    expect((row.plate_layout as { placements: unknown[] }).placements).toHaveLength(2);
    const job = await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = 'advance-booking' and singleton_key = ${`build:${build.id}:${build.version + 1}`}`.execute(db);
    expect(job.rows[0].n).toBe(1);
    const ev = await db.selectFrom("events").select(["kind", "to_state"]).where("entity", "=", "build").where("entity_id", "=", build.id).where("kind", "=", "schedule").execute();
    expect(ev).toHaveLength(1);
  });

  it("moves a booked build in time and reassigns it to another printer, re-estimating on the faster one", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const a = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: hoursFromNow(80).toISOString() });
    expect(a.status).toBe(200);
    const moved = await schedule(build.id, { version: a.body.build.version, printer_id: wide.id, starts_at: hoursFromNow(90).toISOString() });
    expect(moved.status, JSON.stringify(moved.body)).toBe(200);
    expect(new Date(moved.body.build.starts_at).getTime()).toBe(hoursFromNow(90).getTime());
    const reassigned = await schedule(build.id, { version: moved.body.build.version, printer_id: second.id, starts_at: hoursFromNow(90).toISOString() });
    expect(reassigned.status, JSON.stringify(reassigned.body)).toBe(200);
    expect(reassigned.body.build.printer_id).toBe(second.id);
    // twice the deposition rate: the deposition part of the time halves, the layer overhead stays
    expect(reassigned.body.build.est_minutes).toBeLessThan(moved.body.build.est_minutes);
    const off = await schedule(build.id, { version: reassigned.body.build.version, printer_id: null });
    expect(off.status).toBe(200);
    expect(off.body.build).toMatchObject({ state: "draft", printer_id: null, starts_at: null, ends_at: null });
  });

  it("refuses an overlapping booking with 409 naming the build already there", async () => {
    const first = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const second_ = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const start = hoursFromNow(130);
    const ok = await schedule(first.build.id, { version: first.build.version, printer_id: wide.id, starts_at: start.toISOString() });
    expect(ok.status).toBe(200);
    const clash = await schedule(second_.build.id, { version: second_.build.version, printer_id: wide.id, starts_at: new Date(start.getTime() + 30 * 60_000).toISOString() });
    expect(clash.status).toBe(409);
    expect(clash.body.error.message).toContain(first.build.code);
    const after = await db.selectFrom("builds").select(["state", "version"]).where("id", "=", second_.build.id).executeTakeFirstOrThrow();
    expect(after).toEqual({ state: "draft", version: second_.build.version });
    // touching ranges [start, end) are allowed
    const touching = await schedule(second_.build.id, { version: second_.build.version, printer_id: wide.id, starts_at: ok.body.build.ends_at });
    expect(touching.status, JSON.stringify(touching.body)).toBe(200);
    expect(await overlapsOn(db, wide.id)).toEqual([]);
  });

  it("refuses a stale version with 409 and the current version", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const ok = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: hoursFromNow(170).toISOString() });
    expect(ok.status).toBe(200);
    const stale = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: hoursFromNow(180).toISOString() });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current_version).toBe(ok.body.build.version);
  });

  it("refuses incompatible printers with 422: another material, a plate too small, a gantry too low", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", size: [40, 30, 20] });
    const material = await schedule(build.id, { version: build.version, printer_id: other.id, starts_at: hoursFromNow(200).toISOString() });
    expect(material.status).toBe(422);
    expect(material.body.error.fieldErrors.printer_id[0]).toMatch(/material/);
    const tall = await makeDraftBuild(tech, db, { material: "17-4PH", size: [20, 20, 40] });
    const low = await schedule(tall.build.id, { version: tall.build.version, printer_id: small.id, starts_at: hoursFromNow(200).toISOString() });
    expect(low.status).toBe(422);
    expect(low.body.error.fieldErrors.printer_id[0]).toMatch(/build height/);
    const many = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 6, size: [20, 20, 10] });
    const crowded = await schedule(many.build.id, { version: many.build.version, printer_id: small.id, starts_at: hoursFromNow(200).toISOString() });
    expect(crowded.status).toBe(422);
    expect(crowded.body.error.fieldErrors.printer_id[0]).toMatch(/plate/);
  });

  it("refuses a slot that runs into a maintenance window with 409", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const start = hoursFromNow(240);
    await db.insertInto("maintenance_windows").values({ resource: "printer", printer_id: wide.id, starts_at: new Date(start.getTime() + 3_600_000), ends_at: new Date(start.getTime() + 3 * 3_600_000), reason: "belt check" }).execute();
    const res = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: start.toISOString() });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toContain("belt check");
  });

  it("answers bad bodies with 400 (not JSON) or 422 with the field and the reason, never 500", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const notJson = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: "{not json", headers: { "content-type": "application/json" } });
    expect(notJson.status).toBe(400);
    const cases: Array<[unknown, string]> = [
      [{ printer_id: wide.id, starts_at: hoursFromNow(5).toISOString() }, "version"],
      [{ version: "one", printer_id: wide.id, starts_at: hoursFromNow(5).toISOString() }, "version"],
      [{ version: build.version, printer_id: "nope", starts_at: hoursFromNow(5).toISOString() }, "printer_id"],
      [{ version: build.version, printer_id: wide.id }, "starts_at"],
      [{ version: build.version, printer_id: wide.id, starts_at: "tomorrow at nine" }, "starts_at"],
    ];
    for (const [body, field] of cases) {
      const res = await schedule(build.id, body);
      expect(res.status, JSON.stringify(body)).toBe(422);
      expect(Object.keys(res.body.error.fieldErrors)).toContain(field);
      expect(res.body.error.fieldErrors[field][0].length).toBeGreaterThan(3);
    }
    const unknown = await schedule("00000000-0000-4000-8000-000000000000", { version: 1, printer_id: null });
    expect(unknown.status).toBe(404);
    const notId = await schedule("not-an-id", { version: 1, printer_id: null });
    expect(notId.status).toBe(404);
  });

  it("shows a change made anywhere (here: straight in the database) at the next window request", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const start = hoursFromNow(500);
    const ok = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: start.toISOString() });
    expect(ok.status).toBe(200);
    const window = `/api/floor?from=${new Date(start.getTime() - 86_400_000).toISOString()}&to=${new Date(start.getTime() + 86_400_000).toISOString()}`;
    const before = await api(window, { cookie: tech });
    const mine = (body: { events: { id: string; start: string }[] }) => body.events.find((e) => e.id === build.id);
    expect(new Date(mine(before.body)!.start).getTime()).toBe(start.getTime());
    await db.updateTable("builds").set({ starts_at: new Date(start.getTime() + 3_600_000), ends_at: new Date(new Date(ok.body.build.ends_at).getTime() + 3_600_000) }).where("id", "=", build.id).execute();
    const after = await api(window, { cookie: tech });
    expect(new Date(mine(after.body)!.start).getTime()).toBe(start.getTime() + 3_600_000);
  });

  it("lets only technicians and admins book", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const machinist = await signIn(DEMO.machinist);
    const res = await schedule(build.id, { version: build.version, printer_id: wide.id, starts_at: hoursFromNow(300).toISOString() }, machinist);
    expect(res.status).toBe(403);
    const anon = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", body: { version: 1, printer_id: null } });
    expect(anon.status).toBe(401);
  });

  it("50 concurrent moves onto one lane leave zero overlaps and every loser gets 409", async () => {
    const lane = await makePrinter(db, { materials: ["17-4PH"], build: [300, 250, 200], rate: 20 });
    printers.push(lane.id);
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "17-4PH", quantity: 50, size: [30, 30, 15] });
    const units = await unitsOf(db, part.id);
    const builds = [];
    for (const u of units) builds.push(await makeBuild(tech, [u.id]));
    const base = hoursFromNow(400);
    // Starts every 20 minutes: each print runs longer than that, so neighbours collide.
    const results = await Promise.all(
      builds.map((b, i) => schedule(b.id, { version: b.version, printer_id: lane.id, starts_at: new Date(base.getTime() + (i % 25) * 20 * 60_000).toISOString() })),
    );
    const statuses = results.map((r) => r.status);
    const winners = statuses.filter((s) => s === 200).length;
    const losers = statuses.filter((s) => s === 409).length;
    expect(winners + losers, JSON.stringify(results.filter((r) => r.status !== 200 && r.status !== 409).map((r) => r.body))).toBe(50);
    expect(winners).toBeGreaterThan(0);
    expect(losers).toBeGreaterThan(0);
    expect(await overlapsOn(db, lane.id)).toEqual([]);
    const booked = await db.selectFrom("builds").select("id").where("printer_id", "=", lane.id).where("state", "=", "scheduled").execute();
    expect(booked).toHaveLength(winners);
    for (const r of results.filter((x) => x.status === 409)) expect(r.body.error.message).toMatch(/booked there|already booked|changed by someone/);
  });

  it("lists unscheduled builds earliest due first, a build without a due date last", async () => {
    const later = await makeDraftBuild(tech, db, { material: "17-4PH", due: hoursFromNow(72) });
    const sooner = await makeDraftBuild(tech, db, { material: "17-4PH", due: hoursFromNow(24) });
    const material = await db.selectFrom("materials").select("id").where("code", "=", "17-4PH").executeTakeFirstOrThrow();
    // No units, so no order and no due date.
    const undated = await db.insertInto("builds").values({ code: `ND-${Date.now().toString(36)}`, material_id: material.id, state: "draft" }).returning("id").executeTakeFirstOrThrow();
    const rows = await listUnscheduledBuilds(db, [undated.id, later.build.id, sooner.build.id]);
    expect(rows.map((r) => r.id)).toEqual([sooner.build.id, later.build.id, undated.id]);
    expect(rows[2].due_at).toBeNull();
    await db.deleteFrom("builds").where("id", "=", undated.id).execute();
  });
});
