import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ListObjectsV2Command } from "@aws-sdk/client-s3";
import { testDb } from "../helpers/db";
import { appUrl } from "../helpers/browser";
import { api, DEMO, signIn } from "../helpers/session";
import { names, openEventStream, type EventStream } from "../helpers/event-stream";
import { hoursFromNow, makeBuild, makeOrder, makePart, makePrinter, retirePrinters, uniq, unitsOf } from "../floor/fixtures";
import { getEnv } from "@/lib/env";
import { getS3 } from "@/adapters/storage/s3";
import { ATTACHMENT_MAX_BYTES } from "@/lib/finishing/schemas";

// The feedstock pages' own settings and files through the running app: a lot's certificate of
// analysis streamed into the object store and back, the shop's forms and each material's stock
// rules edited from /inventory, and feedstock changes announced live to the floor.

const { db, close } = testDb();
let tech: string, manager: string, machinist: string;
const printers: string[] = [];
const streams: EventStream[] = [];

beforeAll(async () => {
  [tech, manager, machinist] = await Promise.all([signIn(DEMO.technician), signIn(DEMO.manager), signIn(DEMO.machinist)]);
});
afterAll(async () => {
  for (const s of streams) s.close();
  await retirePrinters(db, printers);
  await close();
});

/** A copy of the demo's 17-4 PH under a new code, with a printer of its own and no lots. */
async function ownMaterial() {
  const code = uniq("FC");
  const src = await db.selectFrom("materials").selectAll().where("code", "=", "17-4PH").executeTakeFirstOrThrow();
  const { id: _id, created_at: _c, updated_at: _u, version: _v, reorder_alerted_at: _r, ...rest } = src;
  const row = await db.insertInto("materials").values({ ...rest, code, name: `certificate test ${code}` }).returning(["id", "code", "version"]).executeTakeFirstOrThrow();
  const printer = await makePrinter(db, { materials: [code], build: [400, 400, 300], rate: 40 });
  printers.push(printer.id);
  return { ...row, printer };
}

async function receive(materialId: string) {
  const res = await api("/api/inventory/lots", {
    method: "POST",
    cookie: tech,
    body: { material_id: materialId, supplier: "Test Supplier", supplier_lot: uniq("SL"), received_on: "2026-11-01", quantity_kg: 5 },
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.lot as { id: string; code: string };
}

const upload = (lotId: string, body: Uint8Array | string, type: string, filename: string, cookie = tech, query = "") =>
  api(`/api/inventory/lots/${lotId}/certificate${query}`, { method: "POST", cookie, body, headers: { "content-type": type, "x-filename": encodeURIComponent(filename) } });

async function storedObjects(lotId: string) {
  const res = await getS3().send(new ListObjectsV2Command({ Bucket: getEnv().S3_BUCKET, Prefix: `certificates/${lotId}/` }));
  return (res.Contents ?? []).map((o) => o.Key!);
}

/** A real PDF: the lot's own container label as the app renders it. */
async function realPdf(lotId: string): Promise<Uint8Array> {
  const res = await fetch(`${appUrl()}/api/inventory/lots/${lotId}/label`, { headers: { cookie: tech } });
  expect(res.status).toBe(200);
  const bytes = new Uint8Array(await res.arrayBuffer());
  expect(new TextDecoder().decode(bytes.subarray(0, 5))).toBe("%PDF-");
  return bytes;
}

describe("certificate of analysis", () => {
  it("streams a PDF into the store, lists it on the lot page and gives the same bytes back", async () => {
    const m = await ownMaterial();
    const lot = await receive(m.id);
    const pdf = await realPdf(lot.id);
    const res = await upload(lot.id, pdf, "application/pdf", "CoA 17-4 lot.pdf");
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.file).toMatchObject({ filename: "CoA_17-4_lot.pdf", content_type: "application/pdf", size_bytes: pdf.byteLength });
    const row = await db.selectFrom("feedstock_lots").select(["certificate_file_id", "version"]).where("id", "=", lot.id).executeTakeFirstOrThrow();
    expect(row.certificate_file_id).toBe(res.body.file.id);
    expect(await storedObjects(lot.id)).toHaveLength(1);

    // every role reads it, byte for byte
    const got = await fetch(`${appUrl()}/api/inventory/lots/${lot.id}/certificate`, { headers: { cookie: machinist } });
    expect(got.status).toBe(200);
    expect(got.headers.get("content-type")).toBe("application/pdf");
    expect(got.headers.get("x-content-type-options")).toBe("nosniff");
    expect(Buffer.from(await got.arrayBuffer()).equals(Buffer.from(pdf))).toBe(true);

    const page = await api(`/inventory/${lot.id}`, { cookie: machinist });
    expect(page.status).toBe(200);
    expect(String(page.body)).toContain("CoA_17-4_lot.pdf");
    expect(String(page.body)).toContain(`/api/inventory/lots/${lot.id}/certificate`);

    // a second certificate replaces the first: one row, one object
    const again = await upload(lot.id, pdf, "application/pdf", "CoA corrected.pdf", tech, `?version=${row.version}`);
    expect(again.status, JSON.stringify(again.body)).toBe(201);
    expect(await db.selectFrom("files").select("id").where("id", "=", res.body.file.id).executeTakeFirst()).toBeUndefined();
    expect(await storedObjects(lot.id)).toHaveLength(1);
    // the version the person loaded has moved on: 409, nothing stored
    const stale = await upload(lot.id, pdf, "application/pdf", "late.pdf", tech, `?version=${row.version}`);
    expect(stale.status).toBe(409);
    expect(await storedObjects(lot.id)).toHaveLength(1);
  });

  it("refuses another type (415), contents that are not what the type says (422), too large (413), a machinist (403) and a lot without one (404)", async () => {
    const m = await ownMaterial();
    const lot = await receive(m.id);
    const before = Number((await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);

    const text = await upload(lot.id, "material,supplier\n17-4PH,Acme\n", "text/csv", "coa.csv");
    expect(text.status).toBe(415);
    expect(text.body.error.fieldErrors.file).toEqual(["not a photo or PDF"]);
    const renamed = await upload(lot.id, "this is not a PDF at all", "application/pdf", "coa.pdf");
    expect(renamed.status).toBe(422);
    expect(renamed.body.error.fieldErrors.file).toEqual(["contents do not match the file type"]);
    const empty = await upload(lot.id, new Uint8Array(), "application/pdf", "empty.pdf");
    expect(empty.status).toBe(422);
    const big = new Uint8Array(ATTACHMENT_MAX_BYTES + 1);
    big.set(new TextEncoder().encode("%PDF-1.7\n"));
    const tooBig = await upload(lot.id, big, "application/pdf", "huge.pdf");
    expect(tooBig.status).toBe(413);
    expect(tooBig.body.error.code).toBe("payload_too_large");
    expect((await upload(lot.id, await realPdf(lot.id), "application/pdf", "coa.pdf", machinist)).status).toBe(403);

    const after = Number((await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow()).n);
    expect(after).toBe(before);
    expect(await storedObjects(lot.id)).toEqual([]);
    expect((await db.selectFrom("feedstock_lots").select("certificate_file_id").where("id", "=", lot.id).executeTakeFirstOrThrow()).certificate_file_id).toBeNull();
    const none = await api(`/api/inventory/lots/${lot.id}/certificate`, { cookie: tech });
    expect(none.status).toBe(404);
  });
});

describe("forms and stock rules from /inventory", () => {
  it("adds a form to the shop's list once (409 for the same name again) and shows it on the page", async () => {
    const name = `${uniq("cartridge")} 500 g`;
    const added = await api("/api/inventory/forms", { method: "POST", cookie: tech, body: { name } });
    expect(added.status, JSON.stringify(added.body)).toBe(201);
    const twice = await api("/api/inventory/forms", { method: "POST", cookie: manager, body: { name: name.toUpperCase() } });
    expect(twice.status).toBe(409);
    expect((await api("/api/inventory/forms", { method: "POST", cookie: machinist, body: { name: "rod" } })).status).toBe(403);
    expect((await api("/api/inventory/forms", { method: "POST", cookie: tech, body: { name: "spool\u0007" } })).status).toBe(422);
    const page = await api("/inventory", { cookie: tech });
    expect(page.status).toBe(200);
    expect(String(page.body)).toContain(name);
    expect(String(page.body)).toContain("Add to the list");
  });

  it("saves a material's allowances, reorder point and lead time with its version, and the page shows the form with them", async () => {
    const m = await ownMaterial();
    const res = await api(`/api/inventory/materials/${m.id}`, { method: "PATCH", cookie: tech, body: { version: m.version, support_allowance: 0.2, purge_g: 40, reorder_point_kg: 12.5, lead_time_days: 21 } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const row = await db.selectFrom("materials").select(["support_allowance", "purge_g", "reorder_point_g", "lead_time_days", "version"]).where("id", "=", m.id).executeTakeFirstOrThrow();
    expect({ s: Number(row.support_allowance), p: Number(row.purge_g), r: Number(row.reorder_point_g), l: row.lead_time_days }).toEqual({ s: 0.2, p: 40, r: 12_500, l: 21 });
    const stale = await api(`/api/inventory/materials/${m.id}`, { method: "PATCH", cookie: tech, body: { version: m.version, support_allowance: 0.1, purge_g: 10, reorder_point_kg: 1, lead_time_days: 7 } });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details.current_version).toBe(row.version);
    const bad = await api(`/api/inventory/materials/${m.id}`, { method: "PATCH", cookie: tech, body: { version: row.version, support_allowance: -1, purge_g: 10, reorder_point_kg: 1, lead_time_days: 400 } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors).sort()).toEqual(["lead_time_days", "support_allowance"]);

    const page = String((await api("/inventory", { cookie: tech })).body);
    expect(page).toContain(`aria-label="Stock rules for ${m.code}"`);
    // the saved figures are what the form starts from: 20 % supports, 12.5 kg, 21 days
    const form = page.slice(page.indexOf(`aria-label="Stock rules for ${m.code}"`)).slice(0, 4000);
    expect(form).toMatch(/name="support_percent"[^>]*value="20"/);
    expect(form).toMatch(/name="reorder_point_kg"[^>]*value="12.5"/);
    expect(form).toMatch(/name="lead_time_days"[^>]*value="21"/);
    // a reader sees the rules as text, without the form
    // (React separates adjacent text with empty comments in server-rendered HTML)
    const read = String((await api("/inventory", { cookie: machinist })).body).replaceAll("<!-- -->", "");
    expect(read).not.toContain(`aria-label="Stock rules for ${m.code}"`);
    expect(read).toContain(`reorder at 12.5 kg, lead time 21 days`);
  });
});

describe("feedstock on the floor, live", () => {
  it("announces a lot's and a material's changes on the event stream, which the floor's feedstock marks listen to", async () => {
    const s = await openEventStream(`${appUrl()}/api/events`, { cookie: manager });
    streams.push(s);
    await s.waitFor((e) => e.event === "ready" || e.event === "resync", 5_000);
    const m = await ownMaterial();
    const lot = await receive(m.id);
    const { version } = await db.selectFrom("feedstock_lots").select("version").where("id", "=", lot.id).executeTakeFirstOrThrow();
    const released = await api(`/api/inventory/lots/${lot.id}`, { method: "PATCH", cookie: tech, body: { version, state: "released" } });
    expect(released.status).toBe(200);
    await s.waitFor(names("feedstock_lot", lot.id, version + 1), 3_000);
    const rules = await api(`/api/inventory/materials/${m.id}`, { method: "PATCH", cookie: tech, body: { version: m.version, support_allowance: 0.1, purge_g: 20, reorder_point_kg: 0, lead_time_days: 14 } });
    expect(rules.status).toBe(200);
    await s.waitFor(names("material", m.id, m.version + 1), 3_000);
  });

  it("marks no build of a material the shop has never received a lot of (its builds start as before)", async () => {
    const m = await ownMaterial();
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: m.code, quantity: 1 });
    const build = await makeBuild(tech, (await unitsOf(db, part.id)).map((u) => u.id));
    const booked = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: m.printer.id, starts_at: hoursFromNow(30).toISOString() } });
    expect(booked.status, JSON.stringify(booked.body)).toBe(200);
    const floor = await api("/api/inventory/shortfalls", { cookie: tech });
    expect(floor.body.builds.map((b: { build_id: string }) => b.build_id)).not.toContain(build.id);
    // the first lot turns tracking on: an empty shelf (quarantine only) now marks it
    await receive(m.id);
    const tracked = await api("/api/inventory/shortfalls", { cookie: tech });
    expect(tracked.body.builds.map((b: { build_id: string }) => b.build_id)).toContain(build.id);
  });
});
