import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { makeDraftBuild, makePrinter, overlapsOn, retirePrinters } from "./fixtures";

// Propose plan over the running app: a proposal books nothing, applies in one transaction,
// and a proposal made stale by another change is refused whole with 409.

const { db, close } = testDb();
let tech: string;
let lanes: Array<{ id: string; name: string }> = [];

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
  // A2 runs on these lanes only among the active printers a test run sees next to the seed's Heron and Finch.
  lanes = [await makePrinter(db, { materials: ["A2"], rate: 30 }), await makePrinter(db, { materials: ["A2"], rate: 15 })];
});

afterAll(async () => {
  await retirePrinters(db, lanes.map((l) => l.id));
  await close();
});

describe("printer-plan proposals", () => {
  it("proposes bookings for chosen builds without booking anything, then applies them in one go", async () => {
    const a = await makeDraftBuild(tech, db, { material: "A2", quantity: 2, due: new Date(Date.now() + 2 * 86_400_000) });
    const b = await makeDraftBuild(tech, db, { material: "A2", due: new Date(Date.now() + 3 * 86_400_000) });
    const c = await makeDraftBuild(tech, db, { material: "A2", due: new Date(Date.now() + 1 * 86_400_000) });
    const ids = [a.build.id, b.build.id, c.build.id];
    const res = await api("/api/plans", { method: "POST", cookie: tech, body: { build_ids: ids } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const p = res.body.proposal;
    expect(p.items).toHaveLength(3);
    expect(p.unplaced).toEqual([]);
    expect(p.metrics.placed).toBe(3);
    expect(p.metrics.on_thread).toBe(true);
    expect(p.metrics.makespan_min).toBeGreaterThanOrEqual(p.metrics.makespan_lower_bound_min - 1e-6);
    for (const item of p.items) {
      expect(new Date(item.starts_at).getTime()).toBeGreaterThanOrEqual(new Date(p.planned_from).getTime());
      expect(item.lateness_min).toBeGreaterThanOrEqual(0);
    }
    // nothing is booked before it is accepted
    const before = await db.selectFrom("builds").select("state").where("id", "in", ids).execute();
    expect(before.every((x) => x.state === "draft")).toBe(true);

    const applied = await api(`/api/plans/${p.id}`, { method: "PATCH", cookie: tech, body: { decision: "apply" } });
    expect(applied.status, JSON.stringify(applied.body)).toBe(200);
    expect(applied.body.proposal.status).toBe("applied");
    const after = await db.selectFrom("builds").select(["id", "state", "printer_id", "starts_at", "ends_at"]).where("id", "in", ids).execute();
    for (const item of p.items) {
      const row = after.find((x) => x.id === item.build_id)!;
      expect(row.state).toBe("scheduled");
      expect(row.printer_id).toBe(item.printer_id);
      expect(new Date(row.starts_at!).toISOString()).toBe(item.starts_at);
      expect(new Date(row.ends_at!).toISOString()).toBe(item.ends_at);
    }
    for (const lane of lanes) expect(await overlapsOn(db, lane.id)).toEqual([]);
    const twice = await api(`/api/plans/${p.id}`, { method: "PATCH", cookie: tech, body: { decision: "apply" } });
    expect(twice.status).toBe(409);
  });

  it("refuses a stale proposal with 409 and books none of it", async () => {
    const a = await makeDraftBuild(tech, db, { material: "A2" });
    const b = await makeDraftBuild(tech, db, { material: "A2" });
    const res = await api("/api/plans", { method: "POST", cookie: tech, body: { build_ids: [a.build.id, b.build.id] } });
    expect(res.status).toBe(201);
    const p = res.body.proposal;
    expect(p.items).toHaveLength(2);
    // someone books one of the two by hand meanwhile
    const item = p.items.find((i: { build_id: string }) => i.build_id === b.build.id);
    const manual = await api(`/api/builds/${b.build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: b.build.version, printer_id: item.printer_id, starts_at: new Date(Date.parse(item.starts_at) + 7 * 86_400_000).toISOString() } });
    expect(manual.status, JSON.stringify(manual.body)).toBe(200);
    const stale = await api(`/api/plans/${p.id}`, { method: "PATCH", cookie: tech, body: { decision: "apply" } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.message).toMatch(/stale/);
    const rowA = await db.selectFrom("builds").select(["state", "version"]).where("id", "=", a.build.id).executeTakeFirstOrThrow();
    expect(rowA).toEqual({ state: "draft", version: a.build.version });
    const stored = await db.selectFrom("plan_proposals").select(["status", "refusal"]).where("id", "=", p.id).executeTakeFirstOrThrow();
    expect(stored.status).toBe("refused");
  });

  it("lets a manager propose but not apply", async () => {
    const manager = await signIn(DEMO.manager);
    const a = await makeDraftBuild(tech, db, { material: "A2" });
    const res = await api("/api/plans", { method: "POST", cookie: manager, body: { build_ids: [a.build.id] } });
    expect(res.status).toBe(201);
    const apply = await api(`/api/plans/${res.body.proposal.id}`, { method: "PATCH", cookie: manager, body: { decision: "apply" } });
    expect(apply.status).toBe(403);
    const bad = await api(`/api/plans/${res.body.proposal.id}`, { method: "PATCH", cookie: tech, body: { decision: "maybe" } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.decision).toBeTruthy();
  });
});
