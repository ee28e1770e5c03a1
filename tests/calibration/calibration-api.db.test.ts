import { afterAll, beforeAll, describe, expect, it } from "vitest";
import * as ss from "simple-statistics";
import { sql } from "kysely";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { makeMaterial, makeOrder, makePart, makeUnit, tag } from "../finishing/fixtures";

// Calibration of a material of the test's own: the statistics the API gives against
// simple-statistics, applying a suggestion (admin only, version- and suggestion-checked,
// logged, builds keep their snapshot) and leaving a measurement out.

const { db, close } = testDb();
let admin: string;
let machinist: string;
let material: { id: string; code: string; version: number };
let buildId: string;
const SHRINK_X = [0.158, 0.162, 0.16, 0.157, 0.163, 0.161];
const SHRINK_Z = [0.176, 0.179, 0.174, 0.178, 0.175, 0.177];
const GREEN = { x: 60, y: 40, z: 25 };

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  machinist = await signIn(DEMO.machinist);
  const t = tag();
  material = await makeMaterial(db, `CAL-${t}`, { xy: 0.15, z: 0.17 });
  const order = await makeOrder(db, `WO-C${t}`, new Date(Date.now() + 30 * 86_400_000));
  const part = await makePart(db, order.id, material.id, `CP-${t}`);
  // A build printed with the old factors: applying calibration must leave its snapshot alone.
  const build = await db
    .insertInto("builds")
    .values({ code: `B-C${t}`, material_id: material.id, state: "draft", scale_snapshot: JSON.stringify({ shrink_xy: 0.15, shrink_z: 0.17 }) })
    .returning("id")
    .executeTakeFirstOrThrow();
  buildId = build.id;
  for (let i = 0; i < SHRINK_X.length; i++) {
    const unit = await makeUnit(db, part.id, `${order.code}-CP-${String(i + 1).padStart(2, "0")}`, "done", { build_id: build.id });
    await db
      .insertInto("inspections")
      .values({
        unit_id: unit.id, passed: true, created_at: new Date(Date.UTC(2026, 9, 1 + i)),
        green_x_mm: GREEN.x, green_y_mm: GREEN.y, green_z_mm: GREEN.z,
        // Y shrinks like X here, so the pooled XY mean is the X mean
        sintered_x_mm: GREEN.x * (1 - SHRINK_X[i]), sintered_y_mm: GREEN.y * (1 - SHRINK_X[i]), sintered_z_mm: GREEN.z * (1 - SHRINK_Z[i]),
      })
      .execute();
  }
});
afterAll(close);

const view = () => api(`/api/calibration/${material.id}`, { cookie: machinist });

describe("calibration of one material", () => {
  it("lists the material with the number of inspections behind it", async () => {
    const res = await api("/api/calibration", { cookie: machinist });
    expect(res.status).toBe(200);
    expect(res.body.materials.find((m: { id: string }) => m.id === material.id)).toMatchObject({ inspections: 6, shrink_xy: 0.15 });
  });

  it("gives points, mean, spread, count and a t interval that agree with simple-statistics", async () => {
    const res = await view();
    expect(res.status).toBe(200);
    const { calibration, points, inspections, applicable } = res.body;
    expect(points).toHaveLength(18);
    expect(inspections).toEqual({ xy: 6, z: 6 });
    expect(calibration.z.count).toBe(6);
    expect(calibration.z.meanShrinkage).toBeCloseTo(ss.mean(SHRINK_Z), 10);
    expect(calibration.z.stdDev).toBeCloseTo(ss.sampleStandardDeviation(SHRINK_Z), 10);
    // Student t, 0.975 quantile, 5 degrees of freedom: 2.571 (standard t tables)
    const half = (2.571 * ss.sampleStandardDeviation(SHRINK_Z)) / Math.sqrt(6);
    expect(calibration.z.interval.halfWidth).toBeCloseTo(half, 6);
    expect(calibration.z.suggestedFactor).toBeCloseTo(1 / (1 - ss.mean(SHRINK_Z)), 10);
    expect(calibration.xy.count).toBe(12);
    expect(applicable.xy).toBeCloseTo(ss.mean(SHRINK_X), 10);
  });

  it("refuses bad input, other roles, a stale version and a suggestion that changed", async () => {
    const current = (await view()).body;
    const body = { version: current.material.version, axes: ["xy", "z"], expected: current.applicable };
    expect((await api(`/api/calibration/${material.id}/apply`, { method: "POST", body, cookie: machinist })).status).toBe(403);
    const bad = await api(`/api/calibration/${material.id}/apply`, { method: "POST", body: { version: 0, axes: [], expected: { xy: 2 } }, cookie: admin });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors)).toEqual(expect.arrayContaining(["version", "axes", "expected.xy"]));
    expect((await api(`/api/calibration/${material.id}/apply`, { method: "POST", body: { ...body, version: body.version + 7 }, cookie: admin })).status).toBe(409);
    const moved = await api(`/api/calibration/${material.id}/apply`, { method: "POST", body: { ...body, expected: { xy: 0.2, z: body.expected.z } }, cookie: admin });
    expect(moved.status).toBe(409);
    expect(moved.body.error.message).toMatch(/suggestion/);
  });

  it("applies the suggestion: new factors, a version bump, an event, a rescale job; the build keeps its snapshot", async () => {
    const current = (await view()).body;
    const res = await api(`/api/calibration/${material.id}/apply`, {
      method: "POST",
      body: { version: current.material.version, axes: ["xy", "z"], expected: current.applicable },
      cookie: admin,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const row = await db.selectFrom("materials").select(["shrink_xy", "shrink_z", "version"]).where("id", "=", material.id).executeTakeFirstOrThrow();
    expect(Number(row.shrink_xy)).toBeCloseTo(ss.mean(SHRINK_X), 5);
    expect(Number(row.shrink_z)).toBeCloseTo(ss.mean(SHRINK_Z), 5);
    expect(row.version).toBe(current.material.version + 1);
    const event = await db.selectFrom("events").selectAll().where("entity", "=", "material").where("entity_id", "=", material.id).where("kind", "=", "calibration_applied").executeTakeFirstOrThrow();
    expect(event.data).toMatchObject({ from: { shrink_xy: 0.15, shrink_z: 0.17 }, axes: ["xy", "z"] });
    // pg-boss keeps its jobs in its own schema: the rescale job was queued in the same transaction
    const { rows } = await sql<{ n: number }>`select count(*)::int as n from pgboss.job where name = 'recompute-scale-up' and data->>'material_id' = ${material.id}`.execute(db);
    expect(rows[0].n).toBeGreaterThanOrEqual(1);
    const build = await db.selectFrom("builds").select("scale_snapshot").where("id", "=", buildId).executeTakeFirstOrThrow();
    expect(build.scale_snapshot).toEqual({ shrink_xy: 0.15, shrink_z: 0.17 });
    const history = (await view()).body.history;
    expect(history[0]).toMatchObject({ kind: "calibration_applied" });
  });

  it("leaves a measurement out with a reason (admin only) and takes it back in", async () => {
    const before = (await view()).body;
    const id = before.points[0].inspection_id;
    expect((await api(`/api/inspections/${id}`, { method: "PATCH", body: { excluded_from_calibration: true, reason: "wrong feature" }, cookie: machinist })).status).toBe(403);
    const noReason = await api(`/api/inspections/${id}`, { method: "PATCH", body: { excluded_from_calibration: true }, cookie: admin });
    expect(noReason.status).toBe(422);
    expect(noReason.body.error.fieldErrors.reason).toBeDefined();
    expect((await api(`/api/inspections/${id}`, { method: "PATCH", body: { excluded_from_calibration: true, reason: "caliper on the wrong feature" }, cookie: admin })).status).toBe(200);
    const after = (await view()).body;
    expect(after.calibration.z.count).toBe(5);
    expect(after.excluded.map((x: { id: string }) => x.id)).toEqual([id]);
    await api(`/api/inspections/${id}`, { method: "PATCH", body: { excluded_from_calibration: false }, cookie: admin });
    expect((await view()).body.calibration.z.count).toBe(6);
  });

  it("will not apply with fewer inspections than the minimum", async () => {
    const t = tag();
    const thin = await makeMaterial(db, `THIN-${t}`);
    const order = await makeOrder(db, `WO-D${t}`, new Date(Date.now() + 86_400_000));
    const part = await makePart(db, order.id, thin.id, `DP-${t}`);
    const unit = await makeUnit(db, part.id, `${order.code}-01`, "done");
    await db.insertInto("inspections").values({ unit_id: unit.id, passed: true, green_z_mm: 20, sintered_z_mm: 16.5 }).execute();
    const v = (await api(`/api/calibration/${thin.id}`, { cookie: admin })).body;
    expect(v.applicable).toEqual({});
    const res = await api(`/api/calibration/${thin.id}/apply`, { method: "POST", body: { version: v.material.version, axes: ["z"], expected: { z: 0.175 } }, cookie: admin });
    expect(res.status).toBe(422);
    expect(res.body.error.fieldErrors.z[0]).toMatch(/at least 5/);
  });
});
