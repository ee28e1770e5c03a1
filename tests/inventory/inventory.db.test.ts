import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { hoursFromNow, makeBuild, makeOrder, makePart, makePrinter, retirePrinters, uniq, unitsOf } from "../floor/fixtures";
import { getSender } from "@/db/jobs/boss";
import { checkStockAlerts } from "@/db/inventory/commands";
import { estimateBuildDraws, projectStock } from "@/db/inventory/reads";
import { partGreen } from "@/db/floor/reads";

// Feedstock through the running app: lots received into quarantine, drawn by builds when they
// start and corrected when they end, projected over the schedule, traced to orders and
// recalled. Each test gets a material of its own, so nothing here empties the demo shelf.

const { db, close } = testDb();
let tech: string, manager: string, machinist: string;
const printers: string[] = [];

beforeAll(async () => {
  [tech, manager, machinist] = await Promise.all([signIn(DEMO.technician), signIn(DEMO.manager), signIn(DEMO.machinist)]);
});
afterAll(async () => {
  await retirePrinters(db, printers);
  await close();
});

/** A copy of the demo's 17-4 PH under a new code, with its own printer and no lots yet. */
async function ownMaterial(opts: { reorder_point_g?: number; lead_time_days?: number } = {}) {
  const code = uniq("FS");
  const src = await db.selectFrom("materials").selectAll().where("code", "=", "17-4PH").executeTakeFirstOrThrow();
  const { id: _id, created_at: _c, updated_at: _u, version: _v, reorder_alerted_at: _r, ...rest } = src;
  const row = await db
    .insertInto("materials")
    .values({ ...rest, code, name: `test feedstock ${code}`, support_allowance: 0.15, purge_g: 25, reorder_point_g: opts.reorder_point_g ?? 0, lead_time_days: opts.lead_time_days ?? 14 })
    .returning(["id", "code", "green_density_g_cm3"])
    .executeTakeFirstOrThrow();
  const printer = await makePrinter(db, { materials: [code], build: [400, 400, 300], rate: 40 });
  printers.push(printer.id);
  return { ...row, printer };
}

async function receive(materialId: string, body: Record<string, unknown> = {}) {
  const res = await api("/api/inventory/lots", {
    method: "POST",
    cookie: tech,
    body: { material_id: materialId, supplier: "Test Supplier", supplier_lot: uniq("SL"), received_on: "2026-11-01", quantity_kg: 5, ...body },
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.lot as { id: string; code: string };
}

async function lotRow(id: string) {
  const r = await db.selectFrom("feedstock_lots").selectAll().where("id", "=", id).executeTakeFirstOrThrow();
  return { ...r, remaining_g: Number(r.remaining_g) };
}

async function release(id: string) {
  const { version } = await lotRow(id);
  const res = await api(`/api/inventory/lots/${id}`, { method: "PATCH", cookie: tech, body: { version, state: "released" } });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
}

/**
 * A build of `quantity` units scheduled to start `startH` hours from now on the material's printer.
 * By default it began three minutes ago: a start further back could put its end, a short print,
 * in the past already, and the worker would complete it before the test starts it.
 */
async function scheduledBuild(m: { code: string; printer: { id: string } }, opts: { quantity?: number; startH?: number } = {}) {
  const order = await makeOrder(tech);
  const part = await makePart(tech, db, { order_id: order.id, material: m.code, quantity: opts.quantity ?? 2 });
  const units = await unitsOf(db, part.id);
  const build = await makeBuild(tech, units.map((u) => u.id));
  const s = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: m.printer.id, starts_at: hoursFromNow(opts.startH ?? -0.05).toISOString() } });
  expect(s.status, JSON.stringify(s.body)).toBe(200);
  return { build: s.body.build as { id: string; code: string; version: number }, part, order, units };
}

/** The draw worked out here from the part's green size, independently of the app's code path. */
async function expectedDrawG(partId: string, units: number, density: number) {
  const p = await db.selectFrom("parts as p").innerJoin("materials as m", "m.id", "p.material_id").selectAll("p").select(["m.shrink_xy", "m.shrink_z"]).where("p.id", "=", partId).executeTakeFirstOrThrow();
  const g = partGreen(p);
  // no geometry uploaded: the printed volume is taken as half the green bounding box
  const volumeCm3 = (0.5 * g.x * g.y * g.z) / 1000;
  const parts = units * volumeCm3 * density;
  return Math.round((parts * 1.15 + 25) * 10) / 10; // + 15 % supports and raft + 25 g purge
}

const start = (id: string, version: number) => api(`/api/builds/${id}/actions`, { method: "POST", cookie: tech, body: { action: "start", version } });

describe("feedstock lots", () => {
  it("receives into quarantine, refuses bad input with the field, and keeps machinists out", async () => {
    const m = await ownMaterial();
    const lot = await receive(m.id, { quantity_kg: 2.5, expires_on: "2027-05-01", storage_notes: "dry cabinet" });
    expect(lot.code).toMatch(/^FL-\d{5}$/);
    const row = await lotRow(lot.id);
    expect(row.state).toBe("quarantine");
    expect(row.remaining_g).toBe(2500);
    const bad = await api("/api/inventory/lots", { method: "POST", cookie: tech, body: { material_id: m.id, supplier: "X", supplier_lot: "Y", received_on: "2026-11-01", expires_on: "2026-10-01", quantity_kg: -1 } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.quantity_kg).toBeTruthy();
    const nul = await api("/api/inventory/lots", { method: "POST", cookie: tech, body: { material_id: m.id, supplier: "A\u0000B", supplier_lot: "Y", received_on: "2026-11-01", quantity_kg: 1 } });
    expect(nul.status).toBe(422);
    expect(nul.body.error.fieldErrors.supplier).toBeTruthy();
    expect((await api("/api/inventory/lots", { method: "POST", cookie: machinist, body: { material_id: m.id } })).status).toBe(403);
    const stale = await api(`/api/inventory/lots/${lot.id}`, { method: "PATCH", cookie: tech, body: { version: row.version + 5, state: "released" } });
    expect(stale.status).toBe(409);
    const list = await api(`/api/inventory/lots?material_id=${m.id}`, { cookie: machinist });
    expect(list.body.lots.map((l: { code: string }) => l.code)).toEqual([lot.code]);
  });

  it("imports a CSV all or nothing, naming the bad row", async () => {
    const m = await ownMaterial();
    const good = `material,supplier,supplier_lot,form,received_on,expires_on,quantity_kg,storage_notes\n${m.code},Calder,CSV-${uniq("A")},spool 1 kg,2026-11-20,,3,\n${m.code},Calder,CSV-${uniq("B")},,2026-11-21,2027-11-21,4.5,shelf 2\n`;
    const bad = good + `${m.code},Calder,CSV-${uniq("C")},,2026-11-22,,lots,\n`;
    const refused = await api("/api/inventory/lots/import", { method: "POST", cookie: tech, body: bad, headers: { "content-type": "text/csv" } });
    expect(refused.status).toBe(422);
    expect(Object.keys(refused.body.error.fieldErrors)).toContain("row 4.quantity_kg");
    expect(await db.selectFrom("feedstock_lots").select("id").where("material_id", "=", m.id).execute()).toHaveLength(0);
    const ok = await api("/api/inventory/lots/import", { method: "POST", cookie: tech, body: good, headers: { "content-type": "text/csv" } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.lots).toHaveLength(2);
    const wrongType = await api("/api/inventory/lots/import", { method: "POST", cookie: tech, body: JSON.stringify({ csv: good }), headers: { "content-type": "application/json" } });
    expect(wrongType.status).toBe(415);
  });
});

describe("a build draws its feedstock", () => {
  it("refuses to start on a quarantined, rejected or expired lot, then draws the worked-out mass and takes the weighed figure at the end", async () => {
    const m = await ownMaterial();
    const lot = await receive(m.id, { quantity_kg: 5 });
    const { build, part } = await scheduledBuild(m, { quantity: 2 });
    const q = await start(build.id, build.version);
    expect(q.status).toBe(409);
    expect(q.body.error.message).toMatch(/needs .* kg of feedstock/); // only a quarantined lot: nothing released
    // choosing the quarantined lot names the reason
    const chosen = await api(`/api/builds/${build.id}`, { method: "PATCH", cookie: tech, body: { version: build.version, feedstock_lot_id: lot.id } });
    expect(chosen.status).toBe(409);
    expect(chosen.body.error.message).toMatch(/quarantine/);
    await release(lot.id);
    const pick = await api(`/api/builds/${build.id}`, { method: "PATCH", cookie: tech, body: { version: build.version, feedstock_lot_id: lot.id } });
    expect(pick.status, JSON.stringify(pick.body)).toBe(200);
    // the lot expires while the build waits: start is refused with the date
    await db.updateTable("feedstock_lots").set({ expires_on: sql`current_date - 3` }).where("id", "=", lot.id).execute();
    const expired = await start(build.id, pick.body.build.version);
    expect(expired.status).toBe(409);
    expect(expired.body.error.message).toMatch(/expired on/);
    await db.updateTable("feedstock_lots").set({ expires_on: null }).where("id", "=", lot.id).execute();
    const ok = await start(build.id, pick.body.build.version);
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    const want = await expectedDrawG(part.id, 2, Number(m.green_density_g_cm3));
    const draws = await db.selectFrom("feedstock_draws").selectAll().where("build_id", "=", build.id).execute();
    expect(draws).toHaveLength(1);
    expect(Number(draws[0].drawn_g)).toBeCloseTo(want, 1);
    expect((await lotRow(lot.id)).remaining_g).toBeCloseTo(5000 - want, 1);
    // weighed at the end: 100 g less than estimated goes back to the lot
    const usedKg = (want - 100) / 1000;
    const done = await api(`/api/builds/${build.id}/actions`, { method: "POST", cookie: tech, body: { action: "complete", version: ok.body.build.version, feedstock_used_kg: usedKg } });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect((await lotRow(lot.id)).remaining_g).toBeCloseTo(5000 - want + 100, 1);
    const corrected = await db.selectFrom("feedstock_draws").select(["drawn_g", "estimated_g", "corrected_at"]).where("build_id", "=", build.id).executeTakeFirstOrThrow();
    expect(Number(corrected.drawn_g)).toBeCloseTo(want - 100, 1);
    expect(Number(corrected.estimated_g)).toBeCloseTo(want, 1);
    expect(corrected.corrected_at).not.toBeNull();
    // and the unit knows where it came from
    const { units } = (await api(`/api/builds/${build.id}`, { cookie: tech })).body;
    const origin = await api(`/api/units/${units[0].id}/origin`, { cookie: machinist });
    expect(origin.body.origin.lots.map((l: { code: string }) => l.code)).toEqual([lot.code]);
  });

  it("lets exactly one of two builds take the last kilograms when both start at once", async () => {
    const m = await ownMaterial();
    const a = await scheduledBuild(m, { quantity: 3, startH: -0.05 });
    const b = await scheduledBuild(m, { quantity: 3, startH: 100 });
    const need = await expectedDrawG(a.part.id, 3, Number(m.green_density_g_cm3));
    // enough for one build and a half
    const lot = await receive(m.id, { quantity_kg: Math.round(need * 1.5) / 1000 });
    await release(lot.id);
    const results = await Promise.all([start(a.build.id, a.build.version), start(b.build.id, b.build.version)]);
    const statuses = results.map((r) => r.status).sort();
    expect(statuses).toEqual([200, 409]);
    expect(results.find((r) => r.status === 409)!.body.error.message).toMatch(/released, in-date lots of its material hold/);
    const left = (await lotRow(lot.id)).remaining_g;
    expect(left).toBeCloseTo(Math.round(need * 1.5) - need, 0);
    expect(left).toBeGreaterThanOrEqual(0);
  });
});

describe("projection and reorder", () => {
  it("projects on hand day by day from the scheduled builds, as counted by hand", async () => {
    const m = await ownMaterial({ reorder_point_g: 0 });
    const lot = await receive(m.id, { quantity_kg: 3 });
    await release(lot.id);
    const b1 = await scheduledBuild(m, { quantity: 2, startH: 24 });
    const b2 = await scheduledBuild(m, { quantity: 2, startH: 72 });
    const g1 = await expectedDrawG(b1.part.id, 2, Number(m.green_density_g_cm3));
    const g2 = await expectedDrawG(b2.part.id, 2, Number(m.green_density_g_cm3));
    const res = await api(`/api/inventory/projection?days=7`, { cookie: machinist });
    expect(res.status).toBe(200);
    const mine = res.body.materials.find((x: { id: string }) => x.id === m.id);
    const zone = res.body.time_zone;
    const dayOf = (d: Date) => new Intl.DateTimeFormat("en-CA", { timeZone: zone }).format(d);
    const d1 = dayOf(hoursFromNow(24)), d2 = dayOf(hoursFromNow(72));
    // by hand: 3000 until the first build's day, then 3000 − g1, then 3000 − g1 − g2
    const want = mine.projection.days.map((d: { day: string }) => Math.round((3000 - (d.day >= d1 ? g1 : 0) - (d.day >= d2 ? g2 : 0)) * 10) / 10);
    expect(mine.projection.days.map((d: { on_hand_g: number }) => d.on_hand_g)).toEqual(want);
    expect(mine.projection.committed_g).toBeCloseTo(g1 + g2, 1);
    expect(mine.projection.first_short_day).toBeNull();
    // with 0.2 kg left the second build runs short, and the floor's shortfall list names it
    await db.updateTable("feedstock_lots").set({ remaining_g: Math.round((g1 + 200) * 10) / 10 }).where("id", "=", lot.id).execute();
    const short = (await api(`/api/inventory/projection?days=7`, { cookie: machinist })).body.materials.find((x: { id: string }) => x.id === m.id);
    expect(short.projection.first_short_day).toBe(d2);
    expect(short.projection.short_builds).toEqual([b2.build.id]);
    const floor = await api("/api/inventory/shortfalls", { cookie: tech });
    expect(floor.body.builds.map((b: { build_id: string }) => b.build_id)).toContain(b2.build.id);
    expect(floor.body.builds.map((b: { build_id: string }) => b.build_id)).not.toContain(b1.build.id);
  });

  it("mails managers once per crossing of the reorder point", async () => {
    const m = await ownMaterial({ reorder_point_g: 100_000, lead_time_days: 10 });
    const lot = await receive(m.id, { quantity_kg: 2 });
    await release(lot.id);
    const boss = await getSender();
    const sent = () => db.selectFrom("notification_outbox").select(["recipient_email", "subject"]).where("kind", "=", "feedstock_reorder").where("subject_key", "like", `material:${m.id}:%`).execute();
    await checkStockAlerts(db, boss);
    await checkStockAlerts(db, boss);
    const managers = await db.selectFrom("users").select("email").where("role", "=", "manager").where("active", "=", true).execute();
    let rows = await sent();
    expect(rows).toHaveLength(managers.length);
    expect(rows[0].subject).toMatch(new RegExp(`Reorder ${m.code}`));
    // recovers above the point: re-armed, no mail; falls again: one more message each
    await db.updateTable("materials").set({ reorder_point_g: 0 }).where("id", "=", m.id).execute();
    await checkStockAlerts(db, boss);
    expect((await db.selectFrom("materials").select("reorder_alerted_at").where("id", "=", m.id).executeTakeFirstOrThrow()).reorder_alerted_at).toBeNull();
    expect(await sent()).toHaveLength(managers.length);
    await db.updateTable("materials").set({ reorder_point_g: 100_000 }).where("id", "=", m.id).execute();
    await checkStockAlerts(db, boss);
    rows = await sent();
    expect(rows).toHaveLength(2 * managers.length);
  });
});

describe("the reorder mail", () => {
  it("names the builds that would run short by their codes", async () => {
    const m = await ownMaterial({ reorder_point_g: 100_000, lead_time_days: 10 });
    const lot = await receive(m.id, { quantity_kg: 2 });
    await release(lot.id);
    const b = await scheduledBuild(m, { quantity: 2, startH: 48 });
    // far less on the shelf than the build draws: it is short on its day
    await db.updateTable("feedstock_lots").set({ remaining_g: 30 }).where("id", "=", lot.id).execute();
    await checkStockAlerts(db, await getSender());
    const rows = await db.selectFrom("notification_outbox").select(["text_body"]).where("kind", "=", "feedstock_reorder").where("subject_key", "like", `material:${m.id}:%`).execute();
    expect(rows.length).toBeGreaterThan(0);
    expect(rows[0].text_body).toContain(b.build.code);
    expect(rows[0].text_body).not.toContain(b.build.id);
  });
});

describe("a material never received", () => {
  it("mails nothing while no build needs it, then once that there is no stock for the first build that does", async () => {
    const m = await ownMaterial({ reorder_point_g: 100_000, lead_time_days: 10 });
    const boss = await getSender();
    const sent = () => db.selectFrom("notification_outbox").select(["recipient_email", "subject", "text_body"]).where("kind", "=", "feedstock_reorder").where("subject_key", "like", `material:${m.id}:%`).execute();
    await checkStockAlerts(db, boss);
    expect(await sent()).toHaveLength(0);
    const b = await scheduledBuild(m, { quantity: 2, startH: 48 });
    const { time_zone } = await projectStock(db, { days: 1 });
    const day = new Intl.DateTimeFormat("en-CA", { timeZone: time_zone }).format(hoursFromNow(48));
    await checkStockAlerts(db, boss);
    await checkStockAlerts(db, boss);
    const managers = await db.selectFrom("users").select("email").where("role", "=", "manager").where("active", "=", true).execute();
    const rows = await sent();
    expect(rows).toHaveLength(managers.length);
    expect(rows[0].subject).toBe(`No ${m.code} feedstock on hand: needed by build ${b.build.code} on ${day}`);
    expect(rows[0].text_body).toContain("No lot of");
  });

  it("projects the same draw per build as the build's own estimate (the one rule, from the database's sums)", async () => {
    const m = await ownMaterial();
    const b = await scheduledBuild(m, { quantity: 3, startH: 30 });
    const est = (await estimateBuildDraws(db, { buildIds: [b.build.id] })).get(b.build.id)!;
    expect(est.total_g).toBe(await expectedDrawG(b.part.id, 3, Number(m.green_density_g_cm3)));
    const { materials } = await projectStock(db, { days: 5, materialId: m.id });
    const drawn = materials[0].projection.days.filter((d) => d.builds.includes(b.build.code));
    expect(drawn).toHaveLength(1);
    expect(drawn[0].drawn_g).toBe(est.total_g);
    expect(materials[0].projection.committed_g).toBe(est.total_g);
  });
});

describe("genealogy and recall", () => {
  it("traces the demo shop's lot to builds, units and orders, and a unit back to its lot", async () => {
    const lot = await db.selectFrom("feedstock_lots").select(["id", "code"]).where("code", "=", "FL-00001").executeTakeFirstOrThrow();
    const res = await api(`/api/inventory/lots/${lot.id}`, { cookie: machinist });
    expect(res.status).toBe(200);
    const rows = res.body.genealogy as Array<{ unit_id: string; build_id: string; order_code: string }>;
    expect(rows.length).toBeGreaterThan(0);
    // every unit listed is on a build that drew from this lot, and every such unit is listed
    const fromDb = await db
      .selectFrom("units as u")
      .innerJoin("feedstock_draws as d", "d.build_id", "u.build_id")
      .select("u.id")
      .where("d.lot_id", "=", lot.id)
      .execute();
    expect(new Set(rows.map((r) => r.unit_id))).toEqual(new Set(fromDb.map((r) => r.id)));
    const back = await api(`/api/units/${rows[0].unit_id}/origin`, { cookie: machinist });
    expect(back.body.origin.lots.map((l: { code: string }) => l.code)).toContain("FL-00001");
    expect(back.body.origin.build_id).toBe(rows[0].build_id);
    const csv = await fetch(`${process.env.APP_URL}/api/inventory/lots/${lot.id}/genealogy`, { headers: { cookie: machinist } });
    expect(csv.headers.get("content-type")).toMatch(/text\/csv/);
    expect((await csv.text()).split("\n").length).toBe(rows.length + 1);
  });

  it("puts exactly the affected units still in the shop on hold and lists the finished ones; CSV cells are formula-safe", async () => {
    const m = await ownMaterial();
    const lot = await receive(m.id, { quantity_kg: 9 });
    await release(lot.id);
    const other = await receive(m.id, { quantity_kg: 9 });
    const a = await scheduledBuild(m, { quantity: 3 });
    const ok = await start(a.build.id, a.build.version);
    expect(ok.status, JSON.stringify(ok.body)).toBe(200);
    // a customer name a spreadsheet would run
    await db.updateTable("orders").set({ customer: "=HYPERLINK(\"http://evil.invalid\")" }).where("id", "=", a.order.id).execute();
    const [u1, u2, u3] = await unitsOf(db, a.part.id);
    await db.updateTable("units").set({ state: "done" }).where("id", "=", u2.id).execute();
    await db.updateTable("units").set({ state: "scrapped", scrap_reason: "crack" }).where("id", "=", u3.id).execute();
    // a unit of another build from another lot must not be touched
    await release(other.id);
    const b = await scheduledBuild(m, { quantity: 1, startH: 200 });
    await api(`/api/builds/${b.build.id}`, { method: "PATCH", cookie: tech, body: { version: b.build.version, feedstock_lot_id: other.id } });
    const { version } = await lotRow(lot.id);
    expect((await api(`/api/inventory/lots/${lot.id}/recall`, { method: "POST", cookie: tech, body: { version, reason: "supplier notice" } })).status).toBe(403);
    const res = await fetch(`${process.env.APP_URL}/api/inventory/lots/${lot.id}/recall?format=csv`, { method: "POST", headers: { cookie: manager, "content-type": "application/json" }, body: JSON.stringify({ version, reason: "supplier notice 4411" }) });
    expect(res.status).toBe(200);
    const csv = await res.text();
    expect(csv).toContain(`"'=HYPERLINK(""http://evil.invalid"")"`);
    expect(csv).not.toMatch(/,=HYPERLINK/);
    const states = await db.selectFrom("units").select(["id", "state", "hold_reason", "held_from"]).where("id", "in", [u1.id, u2.id, u3.id, ...b.units.map((u) => u.id)]).execute();
    const byId = new Map(states.map((s) => [s.id, s]));
    expect(byId.get(u1.id)).toMatchObject({ state: "on_hold", held_from: "printing" });
    expect(byId.get(u1.id)!.hold_reason).toMatch(/recall of feedstock lot .*supplier notice 4411/);
    expect(byId.get(u2.id)!.state).toBe("done");
    expect(byId.get(u3.id)!.state).toBe("scrapped");
    expect(byId.get(b.units[0].id)!.state).toBe("planned");
    const after = await lotRow(lot.id);
    expect(after.state).toBe("rejected");
    expect(after.recalled_at).not.toBeNull();
  });
});

describe("consumables", () => {
  it("counts gas, warns for a run the supply cannot cover, and resets a bath when it is changed", async () => {
    const gas = uniq("test-gas").toLowerCase();
    const count = await api("/api/inventory/gas", { method: "POST", cookie: tech, body: { gas, on_hand_l: 10, note: "one small bottle" } });
    expect(count.status, JSON.stringify(count.body)).toBe(201);
    const run = await db.selectFrom("furnace_runs as r").innerJoin("sinter_profiles as p", "p.id", "r.profile_id").select(["r.id", "r.code", "p.id as profile_id"]).where("r.state", "=", "scheduled").where("r.starts_at", "is not", null).where("r.cycle_minutes", ">", 0).executeTakeFirst();
    if (run) {
      const before = await db.selectFrom("sinter_profiles").select(["process_gas", "gas_flow_l_per_min"]).where("id", "=", run.profile_id).executeTakeFirstOrThrow();
      await db.updateTable("sinter_profiles").set({ process_gas: gas, gas_flow_l_per_min: 5 }).where("id", "=", run.profile_id).execute();
      try {
        const res = await api("/api/inventory/consumables", { cookie: machinist });
        expect(res.body.gas.warnings.map((w: { gas: string }) => w.gas)).toContain(gas);
      } finally {
        await db.updateTable("sinter_profiles").set(before).where("id", "=", run.profile_id).execute();
      }
    }
    const station = await db.selectFrom("wash_stations").select(["id", "version"]).where("active", "=", true).orderBy("name").executeTakeFirstOrThrow();
    const changed = await api(`/api/inventory/baths/${station.id}`, { method: "POST", cookie: tech, body: { version: station.version, note: "fresh solvent" } });
    expect(changed.status, JSON.stringify(changed.body)).toBe(200);
    const after = (await api("/api/inventory/consumables", { cookie: machinist })).body.baths.find((b: { id: string }) => b.id === station.id);
    expect(after.dissolved_g).toBe(0);
    expect((await api(`/api/inventory/baths/${station.id}`, { method: "POST", cookie: tech, body: { version: station.version, note: "" } })).status).toBe(409);
  });
});

describe("planning with the shelf in view", () => {
  it("flags proposed builds whose feedstock will not be there, and leaves the others alone", async () => {
    const m = await ownMaterial();
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: m.code, quantity: 2 });
    const units = await unitsOf(db, part.id);
    const first = await makeBuild(tech, [units[0].id]);
    const second = await makeBuild(tech, [units[1].id]);
    const one = await expectedDrawG(part.id, 1, Number(m.green_density_g_cm3));
    // enough for one of the two builds
    const lot = await receive(m.id, { quantity_kg: Math.round(one * 1.5) / 1000 });
    await release(lot.id);
    const res = await api("/api/plans", { method: "POST", cookie: tech, body: { build_ids: [first.id, second.id] } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const items = res.body.proposal.items as Array<{ build_id: string; starts_at: string; feedstock_short?: string }>;
    expect(items).toHaveLength(2);
    const [earlier, later] = [...items].sort((a, b) => a.starts_at.localeCompare(b.starts_at));
    expect(earlier.feedstock_short).toBeUndefined();
    expect(later.feedstock_short).toMatch(new RegExp(`${m.code} feedstock runs short on \\d{4}-\\d{2}-\\d{2}`));
  });
});
