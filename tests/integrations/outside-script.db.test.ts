// Another program with only an API token and the OpenAPI description (tests/integrations/outside-script.ts)
// creates an order, schedules its build, records the print, wash and furnace load, and receives the
// signed webhook when the furnace run finishes: sent by the real worker when the run's cycle ends,
// received and verified by the local webhook receiver fake with the documented scheme.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { makeFurnace, makeStation, retireEquipment, retireMaterials, staffAroundTheClock, uniq } from "../batches/fixtures";
import { makePrinter, retirePrinters } from "../floor/fixtures";
import { runOutsideScript } from "./outside-script";

const receiver = process.env.WEBHOOK_RECEIVER_URL ?? `http://127.0.0.1:${process.env.WEBHOOK_RECEIVER_PORT ?? 2527}`;
const { db, close } = testDb();
let restoreHours: () => Promise<void>;
let restoreDrying: () => Promise<void>;
let admin: string;
const made = { printers: [] as string[], furnaces: [] as string[], stations: [] as string[], materials: [] as string[] };
let shop: { printer: string; washStation: string; furnace: string; material: string };

/**
 * A sinter profile whose whole cycle takes one minute (a 5 °C ramp and cool-down), so that the run
 * ends while the test waits; and a material of the test's own that uses it. Invented test values,
 * not a process: the real profiles come from the feedstock maker.
 */
async function oneMinuteProfileAndMaterial() {
  const like = await db.selectFrom("materials").selectAll().where("code", "=", "316L").executeTakeFirstOrThrow();
  const profile = await db
    .insertInto("sinter_profiles")
    .values({ code: uniq("T1MIN"), name: "One-minute test cycle", atmosphere: "hydrogen", start_temp_c: 20, cool_rate_c_per_min: 100, cool_to_c: 20 })
    .returning("id")
    .executeTakeFirstOrThrow();
  await db.insertInto("sinter_profile_segments").values({ profile_id: profile.id, position: 0, rate_c_per_min: 100, setpoint_c: 25, hold_min: 0 }).execute();
  const { id: _id, created_at: _c, updated_at: _u, version: _v, ...rest } = like;
  void _id, void _c, void _u, void _v;
  const material = await db
    .insertInto("materials")
    .values({ ...rest, code: uniq("TMEXT"), name: `${like.name} (outside script test)`, default_profile_id: profile.id })
    .returning(["id", "code"])
    .executeTakeFirstOrThrow();
  await db.insertInto("sinter_profile_materials").values({ profile_id: profile.id, material_id: material.id }).execute();
  return { profile_id: profile.id, material_code: material.code };
}

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  restoreHours = await staffAroundTheClock(db);
  // Washed units dry before they count as brown; this shop dries them at once, so the run can be loaded.
  const before = await db.selectFrom("shop_settings").select("drying_minutes").where("id", "=", 1).executeTakeFirstOrThrow();
  await db.updateTable("shop_settings").set({ drying_minutes: 0 }).where("id", "=", 1).execute();
  restoreDrying = async () => void (await db.updateTable("shop_settings").set({ drying_minutes: before.drying_minutes }).where("id", "=", 1).execute());
  const { profile_id, material_code } = await oneMinuteProfileAndMaterial();
  made.materials.push(material_code);
  const printer = await makePrinter(db, { materials: [material_code] });
  const station = await makeStation(db);
  const furnace = await makeFurnace(db, { profiles: [profile_id] });
  made.printers.push(printer.id);
  made.stations.push(station.id);
  made.furnaces.push(furnace.id);
  shop = { printer: printer.name, washStation: station.name, furnace: furnace.name, material: material_code };
});

afterAll(async () => {
  await db.updateTable("webhook_endpoints").set({ active: false }).where("description", "like", "outside script %").execute();
  await retirePrinters(db, made.printers);
  await retireEquipment(db, made.furnaces, made.stations);
  await retireMaterials(db, made.materials);
  await restoreHours();
  await restoreDrying();
  await close();
});

describe("an outside program with a token and the OpenAPI description", () => {
  it("creates an order, schedules its build and receives the signed webhook when the furnace run finishes", { timeout: 240_000 }, async () => {
    const token = await api("/api/api-tokens", {
      method: "POST",
      cookie: admin,
      body: { name: `Outside script ${Date.now()}`, scopes: ["shop:read", "orders:write", "schedule:write", "floor:record", "setup:write"], expires_in_days: 1 },
    });
    expect(token.status, JSON.stringify(token.body)).toBe(201);

    const hookName = `outside-${Date.now().toString(36)}`;
    const out = await runOutsideScript({ baseUrl: appUrl(), token: token.body.token.token, receiverUrl: receiver, hookName, ...shop }, { waitMs: 180_000 });

    // It found every call in the description and each answer was one the description lists.
    expect(out.calls.every((c) => /\s2\d\d$/.test(c)), out.calls.join("\n")).toBe(true);
    expect(out.calls).toEqual(expect.arrayContaining(["postOrders 201", "patchBuildsByIdSchedule 200", "postFurnaceRunsByIdStart 200"]));

    // The notice came, signed with the endpoint's secret (checked by the receiver with the documented scheme).
    expect(out.finished, `deliveries: ${JSON.stringify(out.deliveries.map((d) => d.type))}`).toBeDefined();
    expect(out.finished!.verified, out.finished!.reason ?? "").toBe(true);
    expect(out.finished!.body.data).toMatchObject({ entity: "furnace_run", id: out.run.id, from_state: "running", to_state: "complete" });
    // Exactly one notice for the run's end, and the earlier ones for its order and build.
    expect(out.deliveries.filter((d) => d.type === "furnace_run.finished" && d.body.data.id === out.run.id)).toHaveLength(1);
    expect(out.deliveries.some((d) => d.type === "order.created" && d.body.data.id === out.order.id)).toBe(true);
    expect(out.deliveries.some((d) => d.type === "build.scheduled" && d.body.data.id === out.build.id)).toBe(true);

    // The worker, not the script, ended the run: its units left the furnace (sintered, and on to finishing).
    const run = await db.selectFrom("furnace_runs").select(["state", "unloaded_at"]).where("id", "=", out.run.id).executeTakeFirstOrThrow();
    expect(run).toMatchObject({ state: "complete", unloaded_at: null });
    const units = await db.selectFrom("units").select("state").where("part_id", "=", out.part.id).execute();
    expect(units).toHaveLength(2);
    for (const u of units) expect(["sintered", "ready_for_finishing"]).toContain(u.state);
  });
});
