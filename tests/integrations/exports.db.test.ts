// CSV exports of orders, parts and units against the running app: every page the list's filters
// select, the list's sort, and formula-safe cells (OWASP "CSV Injection", lib/csv/safe-cell.ts).
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { ORDER_CSV_FIELDS, PART_CSV_FIELDS, UNIT_CSV_FIELDS } from "@/lib/exports/tables";

const { db, close } = testDb();
const stamp = Date.now().toString(36).toUpperCase();
let admin: string;
let orderId: string;
let partId: string;

const rowsOf = (text: string) => Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  const material = await db.selectFrom("materials").select("id").where("code", "=", "316L").executeTakeFirstOrThrow();
  const order = await api("/api/orders", { method: "POST", cookie: admin, body: { code: `CSV-${stamp}`, customer: "=cmd|' /C calc'!A0", due_at: new Date(Date.now() + 9 * 86_400_000).toISOString(), priority: 3 } });
  expect(order.status, JSON.stringify(order.body)).toBe(201);
  orderId = order.body.order.id;
  const part = await api("/api/parts", {
    method: "POST",
    cookie: admin,
    body: {
      order_id: orderId, part_number: `CSV-P-${stamp}`, name: "@SUM(1+1)", material_id: material.id, quantity: 3, nominal_x_mm: 20, nominal_y_mm: 10, nominal_z_mm: 5, thickest_wall_mm: 3,
      stock_x_neg_mm: 0, stock_x_pos_mm: 0, stock_y_neg_mm: 0, stock_y_pos_mm: 0, stock_z_neg_mm: 0, stock_z_pos_mm: 0, target_ra_um: null, tolerance_um: null, tolerance_grade: null,
    },
  });
  expect(part.status, JSON.stringify(part.body)).toBe(201);
  partId = part.body.part.id;
});
afterAll(async () => {
  await close();
});

describe("CSV exports", () => {
  it("orders: the searched rows, formula text neutralised and quoted", async () => {
    const res = await api(`/api/orders/export?search=CSV-${stamp}`, { cookie: admin });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="orders-\d{4}-\d{2}-\d{2}\.csv"$/);
    const parsed = rowsOf(res.body as string);
    expect(parsed.meta.fields).toEqual([...ORDER_CSV_FIELDS]);
    expect(parsed.data).toHaveLength(1);
    expect(parsed.data[0]).toMatchObject({ code: `CSV-${stamp}`, customer: "'=cmd|' /C calc'!A0", parts: "1", units: "3", id: orderId });
    expect(res.body as string).toContain(`"'=cmd|' /C calc'!A0"`);
    // a search that matches nothing is a header line only
    expect(rowsOf((await api(`/api/orders/export?search=NOTHING-${stamp}`, { cookie: admin })).body as string).data).toHaveLength(0);
  });

  it("parts and units: filtered by order, the units with their trace columns", async () => {
    const parts = rowsOf((await api(`/api/parts/export?order_id=${orderId}`, { cookie: admin })).body as string);
    expect(parts.meta.fields).toEqual([...PART_CSV_FIELDS]);
    expect(parts.data.map((r) => [r.part_number, r.name, r.id])).toEqual([[`CSV-P-${stamp}`, "'@SUM(1+1)", partId]]);
    const units = await api(`/api/units/export?order_id=${orderId}&sort=serial&dir=desc`, { cookie: admin });
    const parsed = rowsOf(units.body as string);
    expect(parsed.meta.fields).toEqual([...UNIT_CSV_FIELDS]);
    expect(parsed.data).toHaveLength(3);
    // the list's sort: serials descending
    const serials = parsed.data.map((r) => r.serial);
    expect(serials).toEqual([...serials].sort().reverse());
    expect(parsed.data.every((r) => r.state === "planned" && r.build === "" && r.order_code === `CSV-${stamp}`)).toBe(true);
  });

  it("exports every row the filters select, not the list's one page", async () => {
    const all = rowsOf((await api("/api/units/export", { cookie: admin })).body as string).data;
    const total = Number((await db.selectFrom("units").select((eb) => eb.fn.countAll().as("n")).executeTakeFirstOrThrow()).n);
    expect(total).toBeGreaterThan(25);
    expect(all).toHaveLength(total);
  });

  it("refuses a bad filter (422), a caller signed out (401), and notes each export in the security log", async () => {
    const bad = await api("/api/units/export?sort=nonsense&order_id=12", { cookie: admin });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors)).toEqual(expect.arrayContaining(["sort", "order_id"]));
    expect((await api("/api/parts/export")).status).toBe(401);
    const logged = await db.selectFrom("events").select(["reason", "data"]).where("entity", "=", "user").where("kind", "=", "export").where("reason", "=", "parts").orderBy("id", "desc").executeTakeFirstOrThrow();
    expect(logged.data).toMatchObject({ order_id: orderId, rows: 1 });
  });
});
