import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { scaleUp } from "@/lib/process/scale-up";
import { makeOrder, makePart, materialId, unitsOf, uniq } from "../floor/fixtures";

// Orders, parts and units through the API: create with field errors, server-side lists,
// versioned edits, quantity changes and the CSV import's all-or-nothing rule.

const { db, close } = testDb();
let tech: string;

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
});
afterAll(async () => {
  await close();
});

describe("orders", () => {
  it("creates an order and answers bad fields with 422 and the field's reason", async () => {
    const code = uniq("ORD");
    // a priority other than the default is a manager's choice (tests/security/hardening.db.test.ts)
    const ok = await api("/api/orders", { method: "POST", cookie: await signIn(DEMO.manager), body: { code, customer: "Kiln Works", due_at: "2027-03-01", priority: "2" } });
    expect(ok.status, JSON.stringify(ok.body)).toBe(201);
    expect(ok.body.order).toMatchObject({ code, priority: 2 });
    expect(new Date(ok.body.order.due_at).toISOString()).toBe("2027-03-01T23:59:00.000Z");
    const dup = await api("/api/orders", { method: "POST", cookie: tech, body: { code, customer: "Other", due_at: "2027-03-01" } });
    expect(dup.status).toBe(422);
    expect(dup.body.error.fieldErrors.code[0]).toMatch(/taken/);
    const bad = await api("/api/orders", { method: "POST", cookie: tech, body: { code: "has space", customer: "", due_at: "soon", priority: 9 } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors).sort()).toEqual(["code", "customer", "due_at", "priority"]);
    const notJson = await api("/api/orders", { method: "POST", cookie: tech, body: "code=1", headers: { "content-type": "application/json" } });
    expect(notJson.status).toBe(400);
  });

  it("edits with the version, refuses a stale one, and keeps priority changes to managers", async () => {
    const order = await makeOrder(tech);
    const edited = await api(`/api/orders/${order.id}`, { method: "PATCH", cookie: tech, body: { version: order.version, notes: "call before shipping" } });
    expect(edited.status, JSON.stringify(edited.body)).toBe(200);
    const stale = await api(`/api/orders/${order.id}`, { method: "PATCH", cookie: tech, body: { version: order.version, notes: "again" } });
    expect(stale.status).toBe(409);
    const prio = await api(`/api/orders/${order.id}`, { method: "PATCH", cookie: tech, body: { version: edited.body.order.version, priority: 1 } });
    expect(prio.status).toBe(403);
    const manager = await signIn(DEMO.manager);
    const byManager = await api(`/api/orders/${order.id}`, { method: "PATCH", cookie: manager, body: { version: edited.body.order.version, priority: 1 } });
    expect(byManager.status).toBe(200);
    expect(byManager.body.order.priority).toBe(1);
  });

  it("lists orders sorted, searched and paged on the server, each with a projection", async () => {
    const customer = uniq("Cust");
    const early = await api("/api/orders", { method: "POST", cookie: tech, body: { code: uniq("A"), customer, due_at: "2027-01-10" } });
    const late = await api("/api/orders", { method: "POST", cookie: tech, body: { code: uniq("B"), customer, due_at: "2027-01-20" } });
    await makePart(tech, db, { order_id: early.body.order.id, material: "17-4PH", quantity: 2 });
    const asc = await api(`/api/orders?search=${customer}&sort=due_at&dir=asc`, { cookie: tech });
    expect(asc.status).toBe(200);
    expect(asc.body.total).toBe(2);
    expect(asc.body.rows.map((r: { id: string }) => r.id)).toEqual([early.body.order.id, late.body.order.id]);
    const desc = await api(`/api/orders?search=${customer}&sort=due_at&dir=desc&page_size=1&page=1`, { cookie: tech });
    expect(desc.body.rows).toHaveLength(1);
    expect(desc.body.total).toBe(2);
    expect(desc.body.rows[0].id).toBe(late.body.order.id);
    const page2 = await api(`/api/orders?search=${customer}&sort=due_at&dir=desc&page_size=1&page=2`, { cookie: tech });
    expect(page2.body.rows[0].id).toBe(early.body.order.id);
    const withUnits = asc.body.rows[0];
    expect(withUnits.unit_count).toBe(2);
    expect(["on_time", "at_risk", "late"]).toContain(withUnits.projection.status);
    expect(asc.body.rows[1].projection).toBeNull();
    const badSort = await api("/api/orders?sort=password", { cookie: tech });
    expect(badSort.status).toBe(422);
    expect(badSort.body.error.fieldErrors.sort).toBeTruthy();
  });
});

describe("parts and units", () => {
  it("creates a part scaled up with the material's factors and one planned unit per quantity", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "H13", quantity: 3, size: [50, 40, 30] });
    const m = await db.selectFrom("materials").select(["shrink_xy", "shrink_z"]).where("code", "=", "H13").executeTakeFirstOrThrow();
    const s = scaleUp({ nominal: { x: 50, y: 40, z: 30 }, stock: { x_neg: 0.3, x_pos: 0.3, z_pos: 0.2 }, shrink: { xy: Number(m.shrink_xy), z: Number(m.shrink_z) } });
    const row = await db.selectFrom("parts").select(["green_x_mm", "green_y_mm", "green_z_mm"]).where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(Number(row.green_x_mm)).toBeCloseTo(s.x.green, 2);
    expect(Number(row.green_y_mm)).toBeCloseTo(s.y.green, 2);
    expect(Number(row.green_z_mm)).toBeCloseTo(s.z.green, 2);
    const units = await unitsOf(db, part.id);
    expect(units.map((u) => u.state)).toEqual(["planned", "planned", "planned"]);
    expect(units[0].serial).toBe(`${order.code}-${part.part_number}-01`);
    const detail = await api(`/api/parts/${part.id}`, { cookie: tech });
    expect(detail.status).toBe(200);
    expect(detail.body.scale.axes[0].green_mm).toBeCloseTo(s.x.green, 6);
    expect(detail.body.fits.length).toBeGreaterThan(0);
  });

  it("refuses bad part fields with 422 per field", async () => {
    const order = await makeOrder(tech);
    const res = await api("/api/parts", {
      method: "POST",
      cookie: tech,
      body: { order_id: order.id, part_number: "", name: "x", material_id: "not-a-uuid", quantity: 0, nominal_x_mm: -1, nominal_y_mm: "abc", nominal_z_mm: 10, thickest_wall_mm: 3, stock_x_neg_mm: -0.1, tolerance_grade: "IT99" },
    });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors).sort()).toEqual(["material_id", "nominal_x_mm", "nominal_y_mm", "part_number", "quantity", "stock_x_neg_mm", "tolerance_grade"].sort());
    const unknownMaterial = await api("/api/parts", {
      method: "POST",
      cookie: tech,
      body: { order_id: order.id, part_number: "X1", name: "x", material_id: "00000000-0000-4000-8000-000000000000", quantity: 1, nominal_x_mm: 10, nominal_y_mm: 10, nominal_z_mm: 10, thickest_wall_mm: 3 },
    });
    expect(unknownMaterial.status).toBe(422);
    expect(unknownMaterial.body.error.fieldErrors.material_id).toBeTruthy();
  });

  it("edits a part with its version: sizes re-scale, quantity adds and removes planned units", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "17-4PH", quantity: 2 });
    const grown = await api(`/api/parts/${part.id}`, { method: "PATCH", cookie: tech, body: { version: part.version, quantity: 4, nominal_x_mm: 60 } });
    expect(grown.status, JSON.stringify(grown.body)).toBe(200);
    expect(Number(grown.body.part.green_x_mm)).toBeGreaterThan(60);
    expect(await unitsOf(db, part.id)).toHaveLength(4);
    const stale = await api(`/api/parts/${part.id}`, { method: "PATCH", cookie: tech, body: { version: part.version, quantity: 1 } });
    expect(stale.status).toBe(409);
    const shrunk = await api(`/api/parts/${part.id}`, { method: "PATCH", cookie: tech, body: { version: grown.body.part.version, quantity: 1 } });
    expect(shrunk.status).toBe(200);
    expect(await unitsOf(db, part.id)).toHaveLength(1);
  });

  it("lists parts and units with server-side filters, search and sort", async () => {
    const order = await makeOrder(tech);
    const a = await makePart(tech, db, { order_id: order.id, material: "17-4PH", quantity: 1, part_number: `${order.code}-Z` });
    const b = await makePart(tech, db, { order_id: order.id, material: "316L", quantity: 2, part_number: `${order.code}-A` });
    const parts = await api(`/api/parts?order_id=${order.id}&sort=part_number&dir=asc`, { cookie: tech });
    expect(parts.body.total).toBe(2);
    expect(parts.body.rows.map((r: { id: string }) => r.id)).toEqual([b.id, a.id]);
    const m316 = await materialId(db, "316L");
    const filtered = await api(`/api/parts?order_id=${order.id}&material_id=${m316}`, { cookie: tech });
    expect(filtered.body.rows.map((r: { id: string }) => r.id)).toEqual([b.id]);
    const units = await api(`/api/units?search=${order.code}&sort=serial&dir=desc&unbuilt=true`, { cookie: tech });
    expect(units.status).toBe(200);
    expect(units.body.total).toBe(3);
    const serials = units.body.rows.map((r: { serial: string }) => r.serial);
    expect(serials).toEqual([...serials].sort().reverse());
    for (const r of units.body.rows) expect(["on_time", "at_risk", "late"]).toContain(r.projection.status);
  });
});

describe("CSV import", () => {
  const rows = (code: string) => [
    { order_code: code, customer: "Import Co", due_date: "2027-04-01", priority: "3", part_number: "IM-1", revision: "A", name: "hub", material: "17-4PH", quantity: "2", nominal_x_mm: "30", nominal_y_mm: "30", nominal_z_mm: "10", thickest_wall_mm: "4" },
    { order_code: code, customer: "Import Co", due_date: "2027-04-01", priority: "3", part_number: "IM-2", revision: "A", name: "arm", material: "nope", quantity: "1", nominal_x_mm: "-5", nominal_y_mm: "30", nominal_z_mm: "10", thickest_wall_mm: "4" },
    { order_code: code, customer: "Import Co", due_date: "2027-04-01", priority: "3", part_number: "IM-1", revision: "A", name: "hub again", material: "316L", quantity: "1", nominal_x_mm: "30", nominal_y_mm: "30", nominal_z_mm: "10", thickest_wall_mm: "4" },
    { order_code: code, customer: "Import Co", due_date: "2027-04-01", priority: "3", part_number: "IM-3", revision: "B", name: "cap", material: "316l", quantity: "1", nominal_x_mm: "20,5", nominal_y_mm: "20", nominal_z_mm: "5", thickest_wall_mm: "2" },
  ];

  it("checks every row in a dry run and names each bad row's fields", async () => {
    const code = uniq("IMP");
    const res = await api("/api/parts/import", { method: "POST", cookie: tech, body: { rows: rows(code), dry_run: true } });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ valid: 2, invalid: 2, imported_parts: 0 });
    const bad2 = res.body.results.find((r: { row: number }) => r.row === 3);
    expect(Object.keys(bad2.errors).sort()).toEqual(["material", "nominal_x_mm"]);
    const bad3 = res.body.results.find((r: { row: number }) => r.row === 4);
    expect(bad3.errors.part_number[0]).toMatch(/line 2/);
    expect(await db.selectFrom("orders").select("id").where("code", "=", code).execute()).toEqual([]);
  });

  it("imports nothing when a row is invalid, unless asked to import the valid rows only", async () => {
    const code = uniq("IMP");
    const all = await api("/api/parts/import", { method: "POST", cookie: tech, body: { rows: rows(code), mode: "all" } });
    expect(all.status).toBe(422);
    expect(all.body.error.details.invalid).toBe(2);
    expect(await db.selectFrom("orders").select("id").where("code", "=", code).execute()).toEqual([]);
    const valid = await api("/api/parts/import", { method: "POST", cookie: tech, body: { rows: rows(code), mode: "valid_only" } });
    expect(valid.status, JSON.stringify(valid.body)).toBe(201);
    expect(valid.body).toMatchObject({ imported_parts: 2, created_orders: 1 });
    const parts = await db.selectFrom("parts").innerJoin("orders", "orders.id", "parts.order_id").select(["parts.part_number", "parts.nominal_x_mm"]).where("orders.code", "=", code).orderBy("parts.part_number").execute();
    expect(parts.map((p) => [p.part_number, Number(p.nominal_x_mm)])).toEqual([["IM-1", 30], ["IM-3", 20.5]]);
    // the same file again: every part now exists, so every row is refused
    const again = await api("/api/parts/import", { method: "POST", cookie: tech, body: { rows: rows(code), dry_run: true } });
    expect(again.body.valid).toBe(0);
  });

  it("is for roles that may create orders and parts", async () => {
    const machinist = await signIn(DEMO.machinist);
    const res = await api("/api/parts/import", { method: "POST", cookie: machinist, body: { rows: rows(uniq("IMP")) } });
    expect(res.status).toBe(403);
  });
});
