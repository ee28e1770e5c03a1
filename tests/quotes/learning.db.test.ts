import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { quoteLearning } from "@/db/quotes/reads";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";

// Quoted vs actual cost of a finished order that came from a quote, on bookings seeded here with
// recorded times, a feedstock draw, finishing state changes and inspections; priced with the
// demo shop's rates (db/seed.ts) and a printer's and a furnace's own rates set through the API.

const { db, close } = testDb();
let admin: string;
let manager: string;
const tag = randomUUID().slice(0, 8);
// Bookings long past, at a random day, so that they never meet another booking of the resource.
const T0 = Date.UTC(2001, 0, 1) + Math.floor(Math.random() * 3000) * 86_400_000;
const at = (min: number) => new Date(T0 + min * 60_000);

let orderCode = "";
let printerId = "";
let furnaceId = "";

beforeAll(async () => {
  [admin, manager] = await Promise.all([signIn(DEMO.admin), signIn(DEMO.manager)]);
  // Inactive, so that no plan and no page of other tests meets them.
  printerId = (await db.insertInto("printers").values({ name: `Learn P ${tag}`, build_x_mm: 200, build_y_mm: 200, build_z_mm: 150, deposition_cm3_per_h: 20, active: false }).returning("id").executeTakeFirstOrThrow()).id;
  furnaceId = (await db.insertInto("furnaces").values({ name: `Learn F ${tag}`, tray_x_mm: 300, tray_y_mm: 250, tray_count: 2, usable_height_mm: 120, max_load_g: 10_000, max_cool_rate_c_per_min: 8, active: false }).returning("id").executeTakeFirstOrThrow()).id;
});
afterAll(close);

async function seedFinishedOrder() {
  const mat = await db.selectFrom("materials").select(["id"]).where("code", "=", "17-4PH").executeTakeFirstOrThrow();
  const profile = await db.selectFrom("sinter_profiles").select("id").limit(1).executeTakeFirstOrThrow();
  const station = await db.selectFrom("wash_stations").select("id").limit(1).executeTakeFirstOrThrow();
  const machinist = await db.selectFrom("users").select("id").where("role", "=", "machinist").limit(1).executeTakeFirstOrThrow();
  orderCode = `WO-L-${tag}`;
  const order = await db.insertInto("orders").values({ code: orderCode, customer: "Learning Test Ltd", due_at: at(3000) }).returning("id").executeTakeFirstOrThrow();
  const other = await db.insertInto("orders").values({ code: `WO-O-${tag}`, customer: "Other Work Ltd", due_at: at(3000) }).returning("id").executeTakeFirstOrThrow();
  const partValues = { material_id: mat.id, quantity: 4, nominal_x_mm: 20, nominal_y_mm: 20, nominal_z_mm: 10, thickest_wall_mm: 4, revision: "A" };
  const part = await db.insertInto("parts").values({ ...partValues, order_id: order.id, part_number: `L-${tag}`, name: "Learned bracket" }).returning("id").executeTakeFirstOrThrow();
  const otherPart = await db.insertInto("parts").values({ ...partValues, quantity: 6, order_id: other.id, part_number: `O-${tag}`, name: "Other bracket" }).returning("id").executeTakeFirstOrThrow();

  const build = await db.insertInto("builds").values({
    code: `B-L-${tag}`, material_id: mat.id, printer_id: printerId, state: "complete", starts_at: at(0), ends_at: at(300), est_minutes: 280, started_at: at(0), finished_at: at(300),
  }).returning("id").executeTakeFirstOrThrow();
  const wash = await db.insertInto("wash_batches").values({
    code: `W-L-${tag}`, wash_station_id: station.id, state: "complete", starts_at: at(400), ends_at: at(700), est_minutes: 300, started_at: at(400), finished_at: at(700),
  }).returning("id").executeTakeFirstOrThrow();
  const run = await db.insertInto("furnace_runs").values({
    code: `R-L-${tag}`, furnace_id: furnaceId, profile_id: profile.id, state: "complete", starts_at: at(900), ends_at: at(2100), cycle_minutes: 1200, unloaded_at: at(2110),
  }).returning("id").executeTakeFirstOrThrow();
  const lot = await db.insertInto("feedstock_lots").values({
    code: `FL-${tag}`, material_id: mat.id, supplier: "Test supplier", supplier_lot: `lot-${tag}`, received_on: at(-1000), quantity_g: 1000, remaining_g: 750, state: "released",
  }).returning("id").executeTakeFirstOrThrow();
  await db.insertInto("feedstock_draws").values({ lot_id: lot.id, build_id: build.id, estimated_g: 240, drawn_g: 250 }).execute();

  // Ours: 4 units on the plate (3 done, 1 scrapped), all washed and sintered together.
  const mine = await db.insertInto("units").values([0, 1, 2, 3].map((i) => ({
    part_id: part.id, serial: `L-${tag}-${i}`, state: i === 3 ? ("scrapped" as const) : ("done" as const), scrap_reason: i === 3 ? ("crack" as const) : null,
    build_id: build.id, wash_batch_id: wash.id, furnace_run_id: run.id, state_changed_at: at([2230, 2330, 2480, 2200][i]),
  }))).returning("id").execute();
  // Others' units: 1 more on the plate, 4 in the wash batch, 6 in the furnace run.
  await db.insertInto("units").values(Array.from({ length: 6 }, (_, i) => ({
    part_id: otherPart.id, serial: `O-${tag}-${i}`, state: "planned" as const,
    build_id: i < 1 ? build.id : null, wash_batch_id: i < 4 ? wash.id : null, furnace_run_id: run.id,
  }))).execute();

  // Finishing: units 0 and 1 take 30 min straight; unit 2 works 10 min, is held 50 min, works 20 more.
  const ev = (unit: string, to: string, min: number) => ({ entity: "unit", entity_id: unit, kind: "state", from_state: null, to_state: to, created_at: at(min) });
  await db.insertInto("events").values([
    ev(mine[0].id, "finishing", 2200), ev(mine[0].id, "done", 2230),
    ev(mine[1].id, "finishing", 2300), ev(mine[1].id, "done", 2330),
    ev(mine[2].id, "finishing", 2400), ev(mine[2].id, "on_hold", 2410), ev(mine[2].id, "finishing", 2460), ev(mine[2].id, "done", 2480),
  ]).execute();
  await db.insertInto("inspections").values([0, 1, 2].map((i) => ({ unit_id: mine[i].id, inspector_id: machinist.id, passed: true }))).execute();

  await db.insertInto("quotes").values({
    code: `Q-L-${tag}`, customer: "Learning Test Ltd", contact_email: "learn@example.test", status: "accepted", valid_until: at(100), currency: "EUR", minor_digits: 2,
    total_minor: 90_000, promise_at: at(2400), sent_at: at(-100), decided_at: at(-50), order_id: order.id,
    cost: JSON.stringify({ lines: [{ quantity: 3, cost: { figures: [{ key: "feedstock", minor: 3000 }, { key: "subtotal", minor: 50_000 }] } }], setup_minor: 15_000 }),
  }).execute();
}

describe("quoted vs actual cost of finished orders", () => {
  it("lets only an admin set a machine's own rates, and refuses a bad one with the field", async () => {
    const body = { kind: "printer", printer_id: printerId, rate_minor_per_h: 3000 };
    expect((await api("/api/quote-settings/equipment", { method: "PUT", cookie: manager, body })).status).toBe(403);
    const bad = await api("/api/quote-settings/equipment", { method: "PUT", cookie: admin, body: { ...body, rate_minor_per_h: -5 } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.rate_minor_per_h).toBeTruthy();
    expect((await api("/api/quote-settings/equipment", { method: "PUT", cookie: admin, body: { ...body, printer_id: randomUUID() } })).status).toBe(404);
    expect((await api("/api/quote-settings/equipment", { method: "PUT", cookie: admin, body })).status).toBe(200);
    const f = await api("/api/quote-settings/equipment", { method: "PUT", cookie: admin, body: { kind: "furnace", furnace_id: furnaceId, run_cost_minor: "40000", gas_cost_minor: "", energy_cost_minor: 10_000 } });
    expect(f.status, JSON.stringify(f.body)).toBe(200);
    expect(f.body.rate).toMatchObject({ run_cost_minor: 40_000, gas_cost_minor: null, energy_cost_minor: 10_000 });
    const listed = await api("/api/quote-settings", { cookie: manager });
    expect(listed.body.printers.find((p: { id: string }) => p.id === printerId).rate_minor_per_h).toBe(3000);
    expect(listed.body.furnaces.find((x: { id: string }) => x.id === furnaceId).gas_cost_minor).toBeNull();
  });

  it("figures the actual direct cost from what was recorded, at the same rates, beside the quoted one", async () => {
    const s = await db.selectFrom("quote_settings").selectAll().executeTakeFirstOrThrow();
    // The demo shop's rates (db/seed.ts) that the arithmetic below uses.
    expect([s.wash_batch_cost_minor, s.furnace_gas_cost_minor, s.finishing_rate_minor_per_h, s.inspection_rate_minor_per_h, Number(s.inspection_min_per_unit)]).toEqual([4500, 6500, 7200, 6000, 12]);
    const price = await db.selectFrom("material_quote_rates as r").innerJoin("materials as m", "m.id", "r.material_id").select("r.feedstock_minor_per_kg").where("m.code", "=", "17-4PH").executeTakeFirstOrThrow();
    expect(price.feedstock_minor_per_kg).toBe(16_500);
    await seedFinishedOrder();

    const learned = await quoteLearning(db);
    const row = learned.finished.find((f) => f.order_code === orderCode)!;
    expect(row).toBeTruthy();
    const fig = (k: string) => row.actual_figures.find((f) => f.key === k)!.minor;
    // feedstock: our 4 of the plate's 5 units × 250 g drawn = 200 g; 0.2 kg × 16 500 = 3300
    expect(fig("feedstock")).toBe(3_300);
    // printing: 4/5 × (300 min recorded = 5 h) × 3000 per h (the printer's own) = 12 000
    expect(fig("printing")).toBe(12_000);
    // wash: 4 of the batch's 8 units = 0.5 × 4500 = 2250
    expect(fig("wash")).toBe(2_250);
    // furnace: 4 of the run's 10 units = 0.4 × (40 000 own + 6500 shop gas + 10 000 own energy = 56 500) = 22 600
    expect(fig("furnace")).toBe(22_600);
    // finishing: 30 + 30 + (10 + 20, the hold left out) = 90 min × 7200 / 60 = 10 800
    expect(fig("finishing")).toBe(10_800);
    // inspection: 3 inspections × 12 min × 6000 / 60 = 3600
    expect(fig("inspection")).toBe(3_600);
    // set-up as quoted: 15 000; total 3300 + 12 000 + 2250 + 22 600 + 10 800 + 3600 + 15 000 = 69 550
    expect(row.actual_direct_minor).toBe(69_550);
    // quoted direct: the line's subtotal 50 000 + set-up 15 000 = 65 000
    expect(row.quoted_direct_minor).toBe(65_000);
    expect(row).toMatchObject({ units: 4, done: 3, scrapped: 1, late_minutes: 2480 - 2400 });

    const viaApi = await api("/api/quotes/learning", { cookie: manager });
    expect(viaApi.status).toBe(200);
    expect(viaApi.body.finished.find((f: { order_code: string }) => f.order_code === orderCode).actual_direct_minor).toBe(69_550);
    expect(viaApi.body.sent).toBeGreaterThanOrEqual(1);
    expect(viaApi.body.win_rate).toBeGreaterThan(0);
  });
});
