// CSV exports of inspections and of the calibration data against the running app: the columns,
// formula text neutralised (OWASP "CSV Injection", lib/csv/safe-cell.ts), the screens' filters
// (one unit, one material), and refusal for a caller that may not read the shop.
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { CALIBRATION_CSV_FIELDS, INSPECTION_CSV_FIELDS } from "@/lib/exports/tables";

const { db, close } = testDb();
const stamp = Date.now().toString(36).toUpperCase();
const HOSTILE = ["=cmd|' /C calc'!A0", "+1+1", "-2+3", "@SUM(1+1)", "\t=1+2", "\r=1+2"];
let admin: string;
let materialId: string;
let unitIds: string[];

const rowsOf = (text: string) => Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  // A material of this test's own, named with formula text (only an admin can name one).
  const base = await db.selectFrom("materials").selectAll().where("code", "=", "316L").executeTakeFirstOrThrow();
  const { id: _id, code: _code, name: _name, created_at: _c, updated_at: _u, version: _v, ...rest } = base;
  void _id, void _code, void _name, void _c, void _u, void _v;
  const m = await db.insertInto("materials").values({ ...rest, code: `X${stamp}`.slice(0, 20), name: HOSTILE[0] }).returning("id").executeTakeFirstOrThrow();
  materialId = m.id;
  const order = await api("/api/orders", { method: "POST", cookie: admin, body: { code: `INSP-${stamp}`, customer: "Export test", due_at: new Date(Date.now() + 9 * 86_400_000).toISOString() } });
  expect(order.status, JSON.stringify(order.body)).toBe(201);
  const part = await api("/api/parts", {
    method: "POST",
    cookie: admin,
    body: {
      order_id: order.body.order.id, part_number: `INSP-P-${stamp}`, name: "Flange", material_id: materialId, quantity: 2, nominal_x_mm: 20, nominal_y_mm: 10, nominal_z_mm: 5, thickest_wall_mm: 3,
      stock_x_neg_mm: 0, stock_x_pos_mm: 0, stock_y_neg_mm: 0, stock_y_pos_mm: 0, stock_z_neg_mm: 0, stock_z_pos_mm: 0, target_ra_um: null, tolerance_um: null, tolerance_grade: null,
    },
  });
  expect(part.status, JSON.stringify(part.body)).toBe(201);
  await db.updateTable("materials").set({ active: false }).where("id", "=", materialId).execute();
  unitIds = (await db.selectFrom("units").select("id").where("part_id", "=", part.body.part.id).orderBy("serial").execute()).map((u) => u.id);
  // Inspections as a machinist records them, the free text hostile: one on the first unit per
  // hostile value, one plain on the second. Green 23.6 → sintered 20.0 mm is s = 1 − 20/23.6.
  await db
    .insertInto("inspections")
    .values([
      ...HOSTILE.map((h, i) => ({
        unit_id: unitIds[0], passed: i % 2 === 0, reason: i % 2 === 0 ? null : h, notes: h, green_x_mm: 23.6, sintered_x_mm: 20, green_z_mm: 5.9, sintered_z_mm: 5,
        created_at: sql<Date>`now() - make_interval(mins => ${10 - i})`,
      })),
      // a swapped pair: the calibration page sets it aside (shrinkage outside 0–50 %)
      { unit_id: unitIds[1], passed: true, notes: "plain", green_x_mm: 20, sintered_x_mm: 23.6 },
    ])
    .execute();
});
afterAll(async () => {
  await close();
});

describe("inspection CSV export", () => {
  it("has the columns, neutralises every hostile value and honours the unit filter", async () => {
    const res = await api(`/api/inspections/export?unit_id=${unitIds[0]}`, { cookie: admin });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toContain("text/csv");
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="inspections-\d{4}-\d{2}-\d{2}\.csv"$/);
    const parsed = rowsOf(res.body as string);
    expect(parsed.meta.fields).toEqual([...INSPECTION_CSV_FIELDS]);
    expect(parsed.data).toHaveLength(HOSTILE.length);
    expect(parsed.data.every((r) => r.unit_id === unitIds[0] && r.order_code === `INSP-${stamp}` && r.material === `X${stamp}`.slice(0, 20))).toBe(true);
    // newest first: the last hostile value was recorded last
    expect(parsed.data.map((r) => r.notes)).toEqual([...HOSTILE].reverse().map((h) => `'${h}`));
    for (const r of parsed.data) if (r.reason) expect(r.reason.startsWith("'")).toBe(true);
    expect(parsed.data[0]).toMatchObject({ green_x_mm: "23.6", sintered_x_mm: "20" });
    // no cell of the file starts a formula
    for (const r of parsed.data) for (const v of Object.values(r)) expect(v, v).not.toMatch(/^[=+\-@\t\r]/);
    expect(res.body as string).toContain(`"'=cmd|' /C calc'!A0"`);
  });

  it("honours the material filter, and refuses a bad one (422)", async () => {
    const all = rowsOf((await api(`/api/inspections/export?material_id=${materialId}`, { cookie: admin })).body as string).data;
    expect(all).toHaveLength(HOSTILE.length + 1);
    expect(new Set(all.map((r) => r.unit_id))).toEqual(new Set(unitIds));
    const bad = await api("/api/inspections/export?unit_id=12&colour=red", { cookie: admin });
    expect(bad.status).toBe(422);
  });
});

describe("calibration CSV export", () => {
  it("one line per inspection and axis for the page's material, the realized shrinkage, formula text neutralised", async () => {
    const res = await api(`/api/calibration/export?material_id=${materialId}`, { cookie: admin });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toMatch(/^attachment; filename="calibration-\d{4}-\d{2}-\d{2}\.csv"$/);
    const parsed = rowsOf(res.body as string);
    expect(parsed.meta.fields).toEqual([...CALIBRATION_CSV_FIELDS]);
    // six inspections measured on X and Z, one (set aside) on X only
    expect(parsed.data).toHaveLength(HOSTILE.length * 2 + 1);
    expect(parsed.data.every((r) => r.material_name === `'${HOSTILE[0]}`)).toBe(true);
    const used = parsed.data.filter((r) => r.used === "true");
    expect(used).toHaveLength(HOSTILE.length * 2);
    // s = 1 − sintered / green: 1 − 20 / 23.6 = 0.15254… (worked by hand from the definition)
    expect(Number(used.find((r) => r.axis === "x")!.shrinkage)).toBeCloseTo(0.152542, 5);
    expect(Number(used.find((r) => r.axis === "z")!.shrinkage)).toBeCloseTo(1 - 5 / 5.9, 6);
    const aside = parsed.data.filter((r) => r.used === "false");
    expect(aside).toHaveLength(1);
    expect(aside[0]).toMatchObject({ unit_id: unitIds[1], axis: "x", shrinkage: "" });
    expect(aside[0].set_aside_because).toMatch(/outside 0–50 %/);
  });

  it("another material's export holds none of these rows", async () => {
    const other = await db.selectFrom("materials").select("id").where("code", "=", "316L").executeTakeFirstOrThrow();
    const rows = rowsOf((await api(`/api/calibration/export?material_id=${other.id}`, { cookie: admin })).body as string).data;
    expect(rows.some((r) => unitIds.includes(r.unit_id))).toBe(false);
    expect((await api("/api/calibration/export?material_id=nope", { cookie: admin })).status).toBe(422);
  });
});

describe("who may export", () => {
  it("refuses a caller signed out (401) and a token that may not read the shop (403); every signed-in role may", async () => {
    for (const path of [`/api/inspections/export?unit_id=${unitIds[0]}`, `/api/calibration/export?material_id=${materialId}`]) {
      expect((await api(path)).status).toBe(401);
    }
    const made = await api("/api/api-tokens", { method: "POST", cookie: admin, body: { name: `quotes only ${stamp}`, scopes: ["quotes:read"], expires_in_days: 1, rate_limit_per_minute: 600 } });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    const bearer = { authorization: `Bearer ${made.body.token.token}` };
    for (const path of [`/api/inspections/export?unit_id=${unitIds[0]}`, `/api/calibration/export?material_id=${materialId}`]) {
      const res = await api(path, { headers: bearer });
      expect(res.status, path).toBe(403);
      expect(res.body as unknown).not.toEqual(expect.stringContaining(HOSTILE[0]));
    }
    const machinist = await signIn(DEMO.machinist);
    expect((await api(`/api/calibration/export?material_id=${materialId}`, { cookie: machinist })).status).toBe(200);
    await api(`/api/api-tokens/${made.body.token.id}`, { method: "DELETE", cookie: admin });
  });
});
