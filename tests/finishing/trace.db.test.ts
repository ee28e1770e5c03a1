import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { randomUUID } from "node:crypto";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { makeOrder, makePart, makeUnit, tag } from "./fixtures";

// A unit's page gathers its lot, build, printer, wash batch and masses, furnace run and
// profile, inspections and every event, in time order.

const { db, close } = testDb();
let cookie: string;
let unitId: string;
const t = tag();

beforeAll(async () => {
  cookie = await signIn(DEMO.manager);
  const material = await db.selectFrom("materials").select(["id", "default_profile_id"]).where("code", "=", "316L").executeTakeFirstOrThrow();
  const printer = await db.selectFrom("printers").select(["id", "name"]).orderBy("name").executeTakeFirstOrThrow();
  const station = await db.selectFrom("wash_stations").select(["id", "name"]).orderBy("name").executeTakeFirstOrThrow();
  const furnace = await db.selectFrom("furnaces").select(["id", "name"]).orderBy("name").executeTakeFirstOrThrow();
  const h = (n: number) => new Date(Date.UTC(2031, 5, 2, n));
  const build = await db
    .insertInto("builds")
    .values({ code: `B-R${t}`, material_id: material.id, printer_id: printer.id, material_lot: `LOT-${t}`, state: "complete", starts_at: h(0), ends_at: h(10), started_at: h(0), finished_at: h(10) })
    .returning("id")
    .executeTakeFirstOrThrow();
  const wash = await db
    .insertInto("wash_batches")
    .values({ code: `W-R${t}`, wash_station_id: station.id, state: "complete", starts_at: h(12), ends_at: h(20), est_minutes: 480 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const run = await db
    .insertInto("furnace_runs")
    .values({ code: `R-R${t}`, furnace_id: furnace.id, profile_id: material.default_profile_id!, state: "complete", starts_at: h(24), ends_at: h(36), loaded_at: h(24), unloaded_at: h(37), cycle_minutes: 720 })
    .returning("id")
    .executeTakeFirstOrThrow();
  const order = await makeOrder(db, `WO-R${t}`, h(72));
  const part = await makePart(db, order.id, material.id, `RP-${t}`);
  const unit = await makeUnit(db, part.id, `${order.code}-01`, "ready_for_finishing", {
    build_id: build.id, wash_batch_id: wash.id, furnace_run_id: run.id, green_mass_g: 100, brown_mass_g: 95.5, sintered_mass_g: 94,
  });
  unitId = unit.id;
  await db
    .insertInto("events")
    .values([
      { entity: "unit", entity_id: unit.id, kind: "state", from_state: "sintered", to_state: "ready_for_finishing", created_at: h(38) },
      { entity: "unit", entity_id: unit.id, kind: "state", from_state: null, to_state: "planned", created_at: h(-5), reason: "created from order" },
      { entity: "build", entity_id: build.id, kind: "state", from_state: "running", to_state: "complete", created_at: h(10) },
      { entity: "furnace_run", entity_id: run.id, kind: "state", from_state: "running", to_state: "complete", created_at: h(36) },
      // another unit's event must not appear
      { entity: "unit", entity_id: randomUUID(), kind: "state", from_state: "planned", to_state: "printing", created_at: h(1) },
    ])
    .execute();
  await db.insertInto("inspections").values({ unit_id: unit.id, passed: true, green_x_mm: 30, sintered_x_mm: 25.5, created_at: h(40) }).execute();
});
afterAll(close);

describe("GET /api/units/[id]/trace", () => {
  it("gathers the unit's whole history", async () => {
    const res = await api(`/api/units/${unitId}/trace`, { cookie });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const b = res.body;
    expect(b.build).toMatchObject({ code: `B-R${t}`, material_lot: `LOT-${t}` });
    expect(b.build.printer_name).toBeTruthy();
    expect(b.wash.code).toBe(`W-R${t}`);
    expect(b.wash.station_name).toBeTruthy();
    // (100 − 95.5)/100 = 4.5 % against the material's 3.5 % minimum
    expect(b.wash.mass_loss.lossFraction).toBeCloseTo(0.045, 12);
    expect(b.wash.mass_loss.passed).toBe(true);
    expect(b.unit).toMatchObject({ green_mass_g: 100, brown_mass_g: 95.5, sintered_mass_g: 94 });
    expect(b.furnace_run.profile.segments.length).toBeGreaterThan(0);
    expect(b.furnace_run.profile.cycle.total_minutes).toBeGreaterThan(0);
    expect(b.inspections).toHaveLength(1);

    const times = b.timeline.map((e: { at: string }) => e.at);
    expect([...times].sort()).toEqual(times);
    const titles = b.timeline.map((e: { source: string; title: string }) => `${e.source}: ${e.title}`);
    expect(titles).toEqual([
      "unit: planned",
      "build: build B-R" + t + " started",
      "build: running → complete",
      "build: build B-R" + t + " finished",
      "furnace_run: furnace run R-R" + t + " loaded",
      "furnace_run: running → complete",
      "furnace_run: furnace run R-R" + t + " unloaded",
      "unit: sintered → ready for finishing",
      "inspection: inspection passed",
    ]);
  });

  it("answers 404 for a unit that does not exist", async () => {
    expect((await api(`/api/units/${randomUUID()}/trace`, { cookie })).status).toBe(404);
    expect((await api(`/api/units/not-an-id/trace`, { cookie })).status).toBe(404);
  });
});
