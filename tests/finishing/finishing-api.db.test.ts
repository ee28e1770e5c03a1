import { createHash, randomBytes } from "node:crypto";
import http from "node:http";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { appUrl } from "../helpers/browser";
import { PDF_MIN, PNG_1X1, readyUnit } from "./fixtures";

// The finishing queue and inspections against the running app: the state machine, versions,
// field errors, readings in inches, the runout stock check and attachments in object storage.

const { db, close } = testDb();
let machinist: string;
let technician: string;

beforeAll(async () => {
  machinist = await signIn(DEMO.machinist);
  technician = await signIn(DEMO.technician);
});
afterAll(close);

const act = (id: string, body: unknown, cookie = machinist) => api(`/api/finishing/${id}`, { method: "POST", body, cookie });
const inspect = (body: unknown, cookie = machinist) => api("/api/inspections", { method: "POST", body, cookie });
const unitRow = (id: string) => db.selectFrom("units").selectAll().where("id", "=", id).executeTakeFirstOrThrow();

describe("the finishing queue", () => {
  it("lists a ready unit with its stock per face and its tolerance read as µm", async () => {
    const { unit } = await readyUnit(db, { part: { nominal: [25, 40, 12], tolerance_grade: "IT7" } });
    const res = await api("/api/finishing", { cookie: machinist });
    expect(res.status).toBe(200);
    const card = res.body.ready.find((c: { id: string }) => c.id === unit.id);
    expect(card).toBeDefined();
    expect(card.part).toMatchObject({ stock_x_neg_mm: 0.25, stock_z_neg_mm: 0, stock_z_pos_mm: 0.25 });
    // ISO 286-1: IT7 is 21 µm over 18–30 mm, 25 µm over 30–50 mm, 18 µm over 10–18 mm
    expect(card.tolerance).toEqual({ kind: "grade", grade: "IT7", perAxisUm: { x: 21, y: 25, z: 18 }, beyondTable: [] });
    expect(card.actions).toEqual(["accept", "hold"]);
  });
});

describe("accept → inspect → finish", () => {
  it("moves only along the rules, with versions, events and field errors", async () => {
    const { unit } = await readyUnit(db);
    // a role without finishing:write is refused before anything else
    expect((await act(unit.id, { action: "accept", version: 1 }, technician)).status).toBe(403);
    expect((await api(`/api/finishing/${unit.id}`, { method: "POST", body: "not json", cookie: machinist, headers: { "content-type": "application/json" } })).status).toBe(400);
    expect((await act(unit.id, "not json")).status).toBe(415); // not sent as JSON at all
    const bad = await act(unit.id, { action: "polish", version: "one" });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors)).toEqual(expect.arrayContaining(["action", "version"]));

    const accepted = await act(unit.id, { action: "accept", version: 1 });
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
    expect(accepted.body.unit).toMatchObject({ state: "finishing", version: 2 });
    // the same click from a stale page
    const stale = await act(unit.id, { action: "accept", version: 1 });
    expect(stale.status).toBe(409);
    expect(stale.body.error.details).toMatchObject({ current_version: 2, current_state: "finishing" });

    // no inspection yet: finishing is refused with the reason
    const early = await act(unit.id, { action: "finish", version: 2 });
    expect(early.status).toBe(422);
    expect(early.body.error.message).toMatch(/inspection/);

    const staleInspection = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    expect(staleInspection.status).toBe(409);
    const saved = await inspect({ unit_id: unit.id, version: 2, units: "mm", passed: true, sintered: { x: 25.5 }, finished: { x: 25.01 }, ra: 0.7 });
    expect(saved.status, JSON.stringify(saved.body)).toBe(201);
    expect(saved.body.unit_version).toBe(3);

    const done = await act(unit.id, { action: "finish", version: 3 });
    expect(done.status, JSON.stringify(done.body)).toBe(200);
    expect(done.body.unit.state).toBe("done");
    const row = await unitRow(unit.id);
    expect(row).toMatchObject({ state: "done", version: 4 });

    const events = await db.selectFrom("events").selectAll().where("entity", "=", "unit").where("entity_id", "=", unit.id).orderBy("id").execute();
    expect(events.map((e) => [e.kind, e.from_state, e.to_state])).toEqual([
      ["state", "ready_for_finishing", "finishing"],
      ["inspection", null, null],
      ["state", "finishing", "done"],
    ]);
    const machinistId = (await db.selectFrom("users").select("id").where("email", "=", DEMO.machinist).executeTakeFirstOrThrow()).id;
    expect(events.every((e) => e.actor_id === machinistId)).toBe(true);
    // a finished unit takes no more inspections
    const after = await inspect({ unit_id: unit.id, version: 4, units: "mm", passed: true, finished: { x: 25 } });
    expect(after.status).toBe(422);
  });

  it("scraps as out of tolerance only after a failed inspection, and holds and releases with a reason", async () => {
    const { unit } = await readyUnit(db);
    await act(unit.id, { action: "accept", version: 1 });
    expect((await act(unit.id, { action: "scrap", version: 2 })).status).toBe(422);
    const noReason = await inspect({ unit_id: unit.id, version: 2, units: "mm", passed: false, finished: { y: 40.2 } });
    expect(noReason.status).toBe(422);
    expect(noReason.body.error.fieldErrors.reason).toBeDefined();
    expect((await inspect({ unit_id: unit.id, version: 2, units: "mm", passed: false, reason: "Y 0.2 mm oversize after grind", finished: { y: 40.2 } })).status).toBe(201);
    expect((await act(unit.id, { action: "finish", version: 3 })).status).toBe(422);

    const held = await act(unit.id, { action: "hold", version: 3 });
    expect(held.status).toBe(422);
    expect(held.body.error.fieldErrors.reason).toBeDefined();
    const onHold = await act(unit.id, { action: "hold", version: 3, reason: "waiting for the bore gauge" });
    expect(onHold.body.unit).toMatchObject({ state: "on_hold", held_from: "finishing", hold_reason: "waiting for the bore gauge" });
    const back = await act(unit.id, { action: "release", version: 4 });
    expect(back.body.unit).toMatchObject({ state: "finishing", held_from: null, hold_reason: null });

    const scrapped = await act(unit.id, { action: "scrap", version: 5 });
    expect(scrapped.status, JSON.stringify(scrapped.body)).toBe(200);
    const row = await unitRow(unit.id);
    expect(row).toMatchObject({ state: "scrapped", scrap_reason: "out_of_tolerance", scrap_note: "Y 0.2 mm oversize after grind" });
  });

  it("refuses an inspection of a unit that has not reached finishing", async () => {
    const { unit } = await readyUnit(db);
    await db.updateTable("units").set({ state: "brown" }).where("id", "=", unit.id).execute();
    const res = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    expect(res.status).toBe(422);
    expect(res.body.error.fieldErrors.unit_id[0]).toMatch(/brown/);
  });
});

describe("inspection readings", () => {
  it("stores inch readings as mm and µin as µm, fills the planned green size and keeps the stock check", async () => {
    const { unit } = await readyUnit(db, { part: { nominal: [25, 40, 12], green: [30, 47.65, 14.76], stock: 0.25 } });
    await act(unit.id, { action: "accept", version: 1 });
    // 1.0050 in = 25.527 mm as sintered: 0.2635 mm per side left; 0.02 in = 0.508 mm TIR runout
    // puts the diameter 0.254 mm off centre: 0.304 mm needed with the 0.05 mm margin → a warning
    const res = await inspect({
      unit_id: unit.id, version: 2, units: "in", green_source: "planned",
      sintered: { x: 1.005 }, finished: { x: 0.9843 }, ra: 32, runout: 0.02, runout_axis: "x", passed: true,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.stock_check).toMatchObject({ status: "warning", axis: "x", stockSource: "measured" });
    expect(res.body.stock_check.stockPerSideMm).toBeCloseTo((25.527 - 25) / 2, 9);
    expect(res.body.stock_check.shortByMm).toBeCloseTo(0.254 + 0.05 - 0.2635, 9);
    const row = await db.selectFrom("inspections").selectAll().where("id", "=", res.body.id).executeTakeFirstOrThrow();
    expect(Number(row.sintered_x_mm)).toBeCloseTo(25.527, 9);
    // Ra, the mean absolute profile deviation from the mean line (ISO 4287:1997 / ISO 21920-2:2021,
    // ASME B46.1-2002), converts as a length: 32 µin × 0.0254 µm/µin (NIST SP 811 B.8).
    expect(Number(row.ra_um)).toBeCloseTo(0.8128, 9);
    expect(Number(row.green_x_mm)).toBe(30); // the planned green size, from the part
    expect(row).toMatchObject({ green_source: "planned", entered_units: "in", runout_axis: "x" });

    const list = await api(`/api/inspections?unit_id=${unit.id}`, { cookie: machinist });
    expect(list.body.inspections[0].stock_check.status).toBe("warning");
  });

  it("refuses readings that are not a shrinkage, with the field named", async () => {
    const { unit } = await readyUnit(db);
    const res = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, green: { z: 15 }, sintered: { z: 16 } });
    expect(res.status).toBe(422);
    expect(res.body.error.fieldErrors["sintered.z"]).toBeDefined();
    const planned = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, green_source: "planned", sintered: { x: 40 } });
    expect(planned.status).toBe(422);
    expect(planned.body.error.fieldErrors["sintered.x"]).toBeDefined();
  });
});

describe("attachments", () => {
  const upload = async (inspectionId: string, bytes: Buffer, type: string, name: string, cookie = machinist) => {
    const form = new FormData();
    form.append("file", new Blob([new Uint8Array(bytes)], { type }), name);
    const res = await fetch(`${appUrl()}/api/inspections/${inspectionId}/files`, { method: "POST", body: form, headers: { cookie } });
    return { status: res.status, body: await res.json() };
  };

  it("stores photos and PDFs in object storage and refuses the rest with the right status", async () => {
    const { unit } = await readyUnit(db);
    const saved = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    const id = saved.body.id;
    const png = await upload(id, PNG_1X1, "image/png", "bore photo.png");
    expect(png.status, JSON.stringify(png.body)).toBe(201);
    expect(png.body.filename).toBe("bore_photo.png");
    const pdf = await upload(id, PDF_MIN, "application/pdf", "cmm-report.pdf");
    expect(pdf.status).toBe(201);

    const back = await fetch(`${appUrl()}${png.body.url}`, { headers: { cookie: technician } });
    expect(back.status).toBe(200);
    expect(back.headers.get("content-type")).toBe("image/png");
    expect(Buffer.from(await back.arrayBuffer()).equals(PNG_1X1)).toBe(true);

    const before = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect((await upload(id, Buffer.from("just text"), "image/png", "fake.png")).status).toBe(422);
    expect((await upload(id, PNG_1X1, "application/zip", "a.zip")).status).toBe(415);
    expect((await upload(id, Buffer.alloc(16 * 1024 * 1024, 1), "image/png", "huge.png")).status).toBe(413);
    expect((await upload(id, PNG_1X1, "image/png", "x.png", technician)).status).toBe(403);
    const after = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n)); // nothing half-stored

    const list = await api(`/api/inspections?unit_id=${unit.id}`, { cookie: machinist });
    expect(list.body.inspections[0].files.map((f: { content_type: string }) => f.content_type).sort()).toEqual(["application/pdf", "image/png"]);
  });

  it("a photo near the 15 MB limit is streamed through to storage byte for byte, with its SHA-256 (node:crypto) recorded", async () => {
    const { unit } = await readyUnit(db);
    const saved = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    // A PNG signature, then 14.5 MB of random bytes: the route checks the first bytes, then stores the rest untouched.
    const big = Buffer.concat([PNG_1X1.subarray(0, 8), randomBytes(14.5 * 1024 * 1024)]);
    const form = new FormData();
    form.append("note", "a text field before the file is read past");
    form.append("file", new Blob([new Uint8Array(big)], { type: "image/png" }), "whole plate.png");
    const res = await fetch(`${appUrl()}/api/inspections/${saved.body.id}/files`, { method: "POST", body: form, headers: { cookie: machinist } });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(201);
    expect(body.size_bytes).toBe(big.byteLength);
    const row = await db.selectFrom("files").select(["sha256", "size_bytes"]).where("id", "=", body.id).executeTakeFirstOrThrow();
    expect(row.sha256).toBe(createHash("sha256").update(big).digest("hex"));
    expect(Number(row.size_bytes)).toBe(big.byteLength);
    const back = await fetch(`${appUrl()}${body.url}`, { headers: { cookie: technician } });
    expect(back.status).toBe(200);
    expect(Buffer.from(await back.arrayBuffer()).equals(big)).toBe(true);
  });

  it("a body that is not a form, or a form without the file, is refused naming the field; nothing stored", async () => {
    const { unit } = await readyUnit(db);
    const saved = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    const url = `${appUrl()}/api/inspections/${saved.body.id}/files`;
    const before = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    const raw = await fetch(url, { method: "POST", body: PNG_1X1, headers: { cookie: machinist, "content-type": "image/png" } });
    expect(raw.status).toBe(400);
    expect((await raw.json()).error.fieldErrors.file).toBeDefined();
    const empty = new FormData();
    empty.append("photo", new Blob([new Uint8Array(PNG_1X1)], { type: "image/png" }), "a.png");
    const wrongField = await fetch(url, { method: "POST", body: empty, headers: { cookie: machinist } });
    expect(wrongField.status).toBe(422);
    expect((await wrongField.json()).error.fieldErrors.file).toBeDefined();
    // Cut short: the closing boundary never comes.
    const cut = await fetch(url, { method: "POST", body: "--b\r\ncontent-disposition: form-data; name=\"file\"; filename=\"a.png\"\r\ncontent-type: image/png\r\n\r\n\x89PNG", headers: { cookie: machinist, "content-type": "multipart/form-data; boundary=b" } });
    expect(cut.status).toBe(400);
    const after = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  });

  it("an oversized form sent without a Content-Length (chunked, as a phone may) is cut off at the limit: 413 naming the field, nothing stored", async () => {
    const { unit } = await readyUnit(db);
    const saved = await inspect({ unit_id: unit.id, version: 1, units: "mm", passed: true, finished: { x: 25 } });
    const before = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    const boundary = "----hearth-test-boundary";
    const head = Buffer.from(`--${boundary}\r\ncontent-disposition: form-data; name="file"; filename="huge.png"\r\ncontent-type: image/png\r\n\r\n`);
    const url = new URL(`${appUrl()}/api/inspections/${saved.body.id}/files`);
    const res = await new Promise<{ status: number; body: string }>((resolve, reject) => {
      const req = http.request(
        { host: url.hostname, port: url.port, path: url.pathname, method: "POST", headers: { cookie: machinist, "content-type": `multipart/form-data; boundary=${boundary}`, "transfer-encoding": "chunked" } },
        (r) => {
          let body = "";
          r.on("data", (d) => (body += d));
          r.on("end", () => resolve({ status: r.statusCode!, body }));
        },
      );
      req.on("error", (err) => (req.writableEnded ? undefined : reject(err)));
      (async () => {
        req.write(head);
        const chunk = Buffer.alloc(1024 * 1024, 1);
        // 20 MB against the 15 MB limit; the answer may come before the body is through.
        for (let i = 0; i < 20 && !req.destroyed; i++) if (!req.write(chunk)) await new Promise((r) => req.once("drain", r));
        req.end(`\r\n--${boundary}--\r\n`);
      })().catch(() => undefined);
    });
    expect(res.status, res.body).toBe(413);
    expect(JSON.parse(res.body).error.fieldErrors.file).toBeDefined();
    const after = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  });
});
