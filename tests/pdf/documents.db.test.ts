// The printable PDFs through the running app: the furnace-run sheet and the unit labels of a run
// and of a build, for a customer whose name is Czech, Greek and Cyrillic and one that is Polish;
// who may fetch them (every signed-in role; 401 signed out, 403 for an API token without the
// shop:read scope), 404 for a run or build that does not exist, 422 for ?paper=b5, and the label
// QR codes (rendered by pdf.js, decoded by jsQR) opening each unit's page.
import { randomUUID } from "node:crypto";
import jsQR from "jsqr";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { labelGrid } from "@/lib/pdf/unit-labels";
import { PAPER_POINTS } from "@/lib/pdf/paper";
import { parseScan } from "@/lib/scan/codes";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { readPdf, renderPage } from "../helpers/pdf-reader";
import { DEMO, api, signIn } from "../helpers/session";
import { makeFurnace, makeUnits, profileId, retireEquipment } from "../batches/fixtures";
import { makeDraftBuild } from "../floor/fixtures";

const { db, close } = testDb();
const RUN_CUSTOMER = "Šťastný Σίγμα Жуков";
const BUILD_CUSTOMER = "Łódź Präzision İzmir";
let operator: string;
let machinist: string;
let technician: string;
let admin: string;
let readOnlyActivity: string;
let kiln: { id: string; name: string };
let run: { id: string; code: string };
let runUnits: { id: string; serial: string }[];
let build: { id: string; code: string };
let buildUnits: { id: string; serial: string }[];

async function fetchPdf(path: string, headers: Record<string, string>) {
  const res = await fetch(`${appUrl()}${path}`, { headers, redirect: "manual" });
  return { res, bytes: new Uint8Array(await res.arrayBuffer()) };
}

beforeAll(async () => {
  [operator, machinist, technician, admin] = await Promise.all([signIn(DEMO.furnace_operator), signIn(DEMO.machinist), signIn(DEMO.technician), signIn(DEMO.admin)]);
  const p174 = await profileId(db, "174PH-std");
  kiln = await makeFurnace(db, { profiles: [p174], name: `Pec Ž ${Date.now().toString(36)}` });
  const made = await makeUnits(db, { material: "17-4PH", state: "brown", count: 2, green: [40, 30, 20], mass_g: 120 });
  const part = await db.selectFrom("units").select("part_id").where("id", "=", made[0].id).executeTakeFirstOrThrow();
  const order = await db.selectFrom("parts").select("order_id").where("id", "=", part.part_id).executeTakeFirstOrThrow();
  await db.updateTable("orders").set({ customer: RUN_CUSTOMER }).where("id", "=", order.order_id).execute();
  const opened = await api("/api/furnace-runs", { method: "POST", cookie: operator, body: { furnace_id: kiln.id, profile_id: p174 } });
  expect(opened.status, JSON.stringify(opened.body)).toBe(201);
  run = opened.body;
  let version = opened.body.version as number;
  for (const u of made) {
    const added = await api(`/api/furnace-runs/${run.id}/units`, { method: "POST", cookie: operator, body: { version, unit_id: u.id, unit_version: u.version } });
    expect(added.status, JSON.stringify(added.body)).toBe(200);
    version = added.body.version;
  }
  runUnits = made;
  const b = await makeDraftBuild(technician, db, { material: "17-4PH", quantity: 3 });
  await db.updateTable("orders").set({ customer: BUILD_CUSTOMER }).where("id", "=", b.order.id).execute();
  build = b.build;
  buildUnits = b.units;
  const token = await api("/api/api-tokens", { method: "POST", cookie: admin, body: { name: `pdf-test ${Date.now()}`, scopes: ["activity:read"] } });
  expect(token.status, JSON.stringify(token.body)).toBe(201);
  readOnlyActivity = token.body.token.token;
});

afterAll(async () => {
  await retireEquipment(db, [kiln.id], []);
  await close();
});

describe("the furnace-run sheet", () => {
  it("is a PDF for every role, A4 by default and Letter on ?paper=letter, with the run's units and names as stored", async () => {
    for (const cookie of [operator, machinist]) {
      const { res, bytes } = await fetchPdf(`/api/furnace-runs/${run.id}/sheet`, { cookie });
      expect(res.status).toBe(200);
      expect(res.headers.get("content-type")).toBe("application/pdf");
      expect(res.headers.get("content-disposition")).toBe(`inline; filename="furnace-run-${run.code}-a4.pdf"`);
      const { pages, title } = await readPdf(bytes);
      expect(title).toBe(`Furnace run ${run.code}`);
      expect([Math.round(pages[0].width), Math.round(pages[0].height)]).toEqual([595, 842]);
      const items = pages.flatMap((p) => p.items);
      for (const u of runUnits) expect(items).toContain(u.serial);
      expect(items.filter((t) => t === RUN_CUSTOMER)).toHaveLength(2);
      expect(items.some((t) => t.startsWith(kiln.name))).toBe(true);
      expect(items).toContain("Furnace-run sheet");
    }
    const { res, bytes } = await fetchPdf(`/api/furnace-runs/${run.id}/sheet?paper=letter`, { cookie: operator });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-disposition")).toContain(`-letter.pdf"`);
    const { pages } = await readPdf(bytes);
    expect(pages.map((p) => [p.width, p.height])).toEqual(pages.map(() => [...PAPER_POINTS.letter]));
  });

  it("answers 401 signed out, 403 for a token without shop:read, 404 for a missing run, 422 for ?paper=b5", async () => {
    expect((await api(`/api/furnace-runs/${run.id}/sheet`)).status).toBe(401);
    expect((await api(`/api/furnace-runs/${run.id}/sheet`, { headers: { authorization: `Bearer ${readOnlyActivity}` } })).status).toBe(403);
    expect((await api(`/api/furnace-runs/${randomUUID()}/sheet`, { cookie: operator })).status).toBe(404);
    expect((await api(`/api/furnace-runs/not-a-run/sheet`, { cookie: operator })).status).toBe(404);
    const bad = await api(`/api/furnace-runs/${run.id}/sheet?paper=b5`, { cookie: operator });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.paper).toEqual(["paper must be a4 or letter"]);
  });
});

describe("unit labels", () => {
  it("of a run: one per unit, each QR code opening that unit's page", async () => {
    const { res, bytes } = await fetchPdf(`/api/furnace-runs/${run.id}/labels`, { cookie: machinist });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/pdf");
    expect(res.headers.get("content-disposition")).toBe(`inline; filename="unit-labels-${run.code}-a4.pdf"`);
    const { pages } = await readPdf(bytes);
    expect([Math.round(pages[0].width), Math.round(pages[0].height)]).toEqual([595, 842]);
    const joined = pages[0].items.join("");
    const sortedSerials = [...runUnits].map((u) => u.serial).sort();
    expect(joined.indexOf(sortedSerials[0])).toBeGreaterThanOrEqual(0);
    expect(joined.indexOf(sortedSerials[1])).toBeGreaterThan(joined.indexOf(sortedSerials[0]));
    expect(pages[0].items.filter((t) => t === RUN_CUSTOMER)).toHaveLength(2);
    // The QR codes, in label order (serial order), rendered and decoded.
    const sorted = [...runUnits].sort((a, b) => a.serial.localeCompare(b.serial));
    const scale = 3;
    const img = await renderPage(bytes, 1, scale);
    const grid = labelGrid("a4", sorted.length);
    for (let i = 0; i < sorted.length; i++) {
      const g = grid[i];
      const x0 = Math.floor(g.x * scale);
      const y0 = Math.floor((PAPER_POINTS.a4[1] - g.y - g.h) * scale);
      const side = Math.floor(g.h * scale);
      const crop = new Uint8ClampedArray(side * side * 4);
      for (let r = 0; r < side; r++) crop.set(img.data.subarray(((y0 + r) * img.width + x0) * 4, ((y0 + r) * img.width + x0 + side) * 4), r * side * 4);
      const decoded = jsQR(crop, side, side)?.data ?? "";
      expect(decoded).toMatch(new RegExp(`^https?://[^/]+/units/${sorted[i].id}$`));
      expect(parseScan(decoded)).toEqual({ kind: "page", scanKind: "unit", id: sorted[i].id });
    }
  });

  it("of a build: one per unit with the customer's name, on Letter when asked", async () => {
    const { res, bytes } = await fetchPdf(`/api/builds/${build.id}/labels?paper=letter`, { cookie: technician });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toBe("application/pdf");
    expect(res.headers.get("content-disposition")).toBe(`inline; filename="unit-labels-${build.code}-letter.pdf"`);
    const { pages } = await readPdf(bytes);
    expect([pages[0].width, pages[0].height]).toEqual([612, 792]);
    // A long code goes over two lines on a label: read back, its lines follow one another.
    for (const u of buildUnits) expect(pages[0].items.join("")).toContain(u.serial);
    expect(pages[0].items.filter((t) => t === BUILD_CUSTOMER)).toHaveLength(buildUnits.length);
  });

  it("answer 401 signed out, 403 for a token without shop:read, 404 for what does not exist, 422 for ?paper=b5", async () => {
    for (const path of [`/api/furnace-runs/${run.id}/labels`, `/api/builds/${build.id}/labels`]) {
      expect((await api(path)).status).toBe(401);
      expect((await api(path, { headers: { authorization: `Bearer ${readOnlyActivity}` } })).status).toBe(403);
      expect((await api(`${path}?paper=b5`, { cookie: operator })).status).toBe(422);
    }
    expect((await api(`/api/furnace-runs/${randomUUID()}/labels`, { cookie: operator })).status).toBe(404);
    expect((await api(`/api/builds/${randomUUID()}/labels`, { cookie: operator })).status).toBe(404);
  });
});
