import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { PDFDocument } from "pdf-lib";
import { testDb } from "../helpers/db";
import { appUrl } from "../helpers/browser";
import { api, DEMO, signIn } from "../helpers/session";
import { hoursFromNow, makeBuild, makeDraftBuild, makeOrder, makePart, makePrinter, retirePrinters, unitsOf } from "../floor/fixtures";

// Builds through the API: made from planned units of one material, started, completed or
// failed with their units following, and the traveler PDF.

const { db, close } = testDb();
let tech: string;
let printer: { id: string; name: string };

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
  printer = await makePrinter(db, { materials: ["17-4PH", "316L"], build: [300, 250, 200], rate: 25 });
});

afterAll(async () => {
  await retirePrinters(db, [printer.id]);
  await close();
});

const act = (id: string, body: unknown) => api(`/api/builds/${id}/actions`, { method: "POST", cookie: tech, body });

describe("builds", () => {
  it("groups planned units of one material into a draft build with a code, and refuses mixed materials or units already on a build", async () => {
    const order = await makeOrder(tech);
    const a = await makePart(tech, db, { order_id: order.id, material: "17-4PH", quantity: 2 });
    const b = await makePart(tech, db, { order_id: order.id, material: "316L", quantity: 1 });
    const ua = await unitsOf(db, a.id);
    const ub = await unitsOf(db, b.id);
    const mixed = await api("/api/builds", { method: "POST", cookie: tech, body: { unit_ids: [ua[0].id, ub[0].id] } });
    expect(mixed.status).toBe(422);
    expect(mixed.body.error.message).toMatch(/one material/);
    const build = await makeBuild(tech, ua.map((u) => u.id));
    expect(build.code).toMatch(/^B-\d+$/);
    const again = await api("/api/builds", { method: "POST", cookie: tech, body: { unit_ids: [ua[0].id] } });
    expect(again.status).toBe(422);
    expect(again.body.error.message).toMatch(/already on a build/);
    const empty = await api("/api/builds", { method: "POST", cookie: tech, body: { unit_ids: [] } });
    expect(empty.status).toBe(422);
    expect(empty.body.error.fieldErrors.unit_ids).toBeTruthy();
    const detail = await api(`/api/builds/${build.id}`, { cookie: tech });
    expect(detail.status).toBe(200);
    expect(detail.body.units).toHaveLength(2);
    const mine = detail.body.verdicts.find((v: { printer_id: string }) => v.printer_id === printer.id);
    expect(mine.ok).toBe(true);
    expect(mine.est_minutes).toBeGreaterThan(0);
    expect(detail.body.layout.placements).toHaveLength(2);
  });

  it("starts and completes: units go planned → printing → green, with events, and early completion frees the slot", async () => {
    const { build, units } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 2 });
    const notYet = await act(build.id, { action: "start", version: build.version });
    expect(notYet.status).toBe(409); // a draft is not on a printer yet
    const s = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: new Date(Date.now() - 30 * 60_000).toISOString() } });
    expect(s.status, JSON.stringify(s.body)).toBe(200);
    const started = await act(build.id, { action: "start", version: s.body.build.version });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    expect(started.body.build.state).toBe("running");
    // the factors it is printed with are kept on the build (German's relation f = 1/(1 − s))
    const m = await db.selectFrom("materials").select(["shrink_xy", "shrink_z"]).where("code", "=", "17-4PH").executeTakeFirstOrThrow();
    const snap = (await db.selectFrom("builds").select("scale_snapshot").where("id", "=", build.id).executeTakeFirstOrThrow()).scale_snapshot as Record<string, number>;
    expect(snap.shrink_xy).toBe(m.shrink_xy);
    expect(snap.z).toBeCloseTo(1 / (1 - m.shrink_z), 12);
    expect((await unitsOf(db, (await db.selectFrom("units").select("part_id").where("id", "=", units[0].id).executeTakeFirstOrThrow()).part_id)).map((u) => u.state)).toEqual(["printing", "printing"]);
    const stale = await act(build.id, { action: "complete", version: s.body.build.version });
    expect(stale.status).toBe(409);
    const done = await act(build.id, { action: "complete", version: started.body.build.version });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.build.state).toBe("complete");
    expect(new Date(done.body.build.ends_at).getTime()).toBeLessThan(new Date(s.body.build.ends_at).getTime());
    const states = await db.selectFrom("units").select("state").where("build_id", "=", build.id).execute();
    expect(states.map((x) => x.state)).toEqual(["green", "green"]);
    const events = await db.selectFrom("events").select(["to_state"]).where("entity", "=", "unit").where("entity_id", "=", units[0].id).orderBy("id").execute();
    expect(events.map((e) => e.to_state)).toEqual(["planned", "printing", "green"]);
  });

  it("fails a running build with a reason: units scrapped as print failures and replaced by planned units", async () => {
    const { build, part } = await makeDraftBuild(tech, db, { material: "316L", quantity: 2 });
    const s = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(30).toISOString() } });
    expect(s.status, JSON.stringify(s.body)).toBe(200);
    // booked ahead so that the worker's end-of-booking job cannot move it on meanwhile
    const started = await act(build.id, { action: "start", version: s.body.build.version });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    const noReason = await act(build.id, { action: "fail", version: started.body.build.version });
    expect(noReason.status).toBe(422);
    expect(noReason.body.error.fieldErrors.reason).toBeTruthy();
    const failed = await act(build.id, { action: "fail", version: started.body.build.version, reason: "first layer lifted" });
    expect(failed.status, JSON.stringify(failed.body)).toBe(200);
    expect(failed.body.build).toMatchObject({ state: "complete", failed: true, failure_reason: "first layer lifted" });
    const all = await unitsOf(db, part.id);
    const scrapped = await db.selectFrom("units").select(["state", "scrap_reason"]).where("part_id", "=", part.id).where("state", "=", "scrapped").execute();
    expect(scrapped).toHaveLength(2);
    expect(scrapped.every((u) => u.scrap_reason === "print_failure")).toBe(true);
    expect(all.filter((u) => u.state === "planned" && !u.build_id)).toHaveLength(2);
  });

  it("cancels a draft and frees its units; unknown actions are refused with the field", async () => {
    const { build, units } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const bad = await act(build.id, { action: "explode", version: build.version });
    expect(bad.status).toBe(422);
    const ok = await act(build.id, { action: "cancel", version: build.version });
    expect(ok.status).toBe(200);
    const u = await db.selectFrom("units").select(["build_id", "state"]).where("id", "=", units[0].id).executeTakeFirstOrThrow();
    expect(u).toEqual({ build_id: null, state: "planned" });
  });

  it("prints a one-page traveler PDF titled with the build code", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 3 });
    const res = await fetch(`${appUrl()}/api/builds/${build.id}/traveler`, { headers: { cookie: tech } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/pdf");
    const bytes = new Uint8Array(await res.arrayBuffer());
    expect(new TextDecoder().decode(bytes.subarray(0, 5))).toBe("%PDF-");
    const doc = await PDFDocument.load(bytes);
    expect(doc.getPageCount()).toBe(1);
    expect(doc.getTitle()).toBe(`Traveler ${build.code}`);
  });

  it("lets a machinist read a build but not change it", async () => {
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const machinist = await signIn(DEMO.machinist);
    expect((await api(`/api/builds/${build.id}`, { cookie: machinist })).status).toBe(200);
    expect((await api(`/api/builds/${build.id}/actions`, { method: "POST", cookie: machinist, body: { action: "cancel", version: build.version } })).status).toBe(403);
  });
});
