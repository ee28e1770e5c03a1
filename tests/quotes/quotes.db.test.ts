import { createHash } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getEnv } from "@/lib/env";
import { boxMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { lineUnit, promiseInputFor } from "@/lib/quotes/evaluate";
import { planPromise } from "@/lib/quotes/promise";
import { lineSpecOf, getQuoteOrThrow, loadQuoteContext } from "@/db/quotes/reads";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";

// Quotes over the running app: roles, hostile bodies, stale edits, sending with the PDF through
// the outbox and the worker, accepting into an order whose plan proposal, once applied, finishes
// the line by the promised date.

const { db, close } = testDb();
let manager: string;
let tech: string;
let admin: string;
let machinist: string;

beforeAll(async () => {
  [manager, tech, admin, machinist] = await Promise.all([signIn(DEMO.manager), signIn(DEMO.technician), signIn(DEMO.admin), signIn(DEMO.machinist)]);
});
afterAll(close);

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, ms = 30_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

async function uploadBox(cookie = manager) {
  const res = await api("/api/quotes/geometry", {
    method: "POST",
    cookie,
    body: writeBinaryStl(boxMesh(40, 30, 20)),
    headers: { "content-type": "application/octet-stream", "x-filename": "bracket.stl" },
  });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const id = res.body.file.id as string;
  await until("analysis", async () => {
    const f = await api(`/api/files/${id}`, { cookie });
    return f.body.file.status === "done" ? f : null;
  });
  return id;
}

const material = async (code: string) => (await db.selectFrom("materials").select("id").where("code", "=", code).executeTakeFirstOrThrow()).id;

describe("quotes", () => {
  it("lets managers write, technicians read and others neither", async () => {
    expect((await api("/api/quotes", { cookie: tech })).status).toBe(200);
    expect((await api("/api/quotes", { method: "POST", cookie: tech, body: { customer: "X", contact_email: "x@example.test" } })).status).toBe(403);
    expect((await api("/api/quotes", { cookie: machinist })).status).toBe(403);
    expect((await api("/api/quotes")).status).toBe(401);
  });

  it("answers bad bodies with 400 and 422 and the field", async () => {
    expect((await api("/api/quotes", { method: "POST", cookie: manager, body: "{not json", headers: { "content-type": "application/json" } })).status).toBe(400);
    expect((await api("/api/quotes", { method: "POST", cookie: manager, body: "{not json" })).status).toBe(415);
    const r = await api("/api/quotes", { method: "POST", cookie: manager, body: { customer: "", contact_email: "nope" } });
    expect(r.status).toBe(422);
    expect(Object.keys(r.body.error.fieldErrors)).toEqual(expect.arrayContaining(["customer", "contact_email"]));
    const bad = await api("/api/quotes/geometry", { method: "POST", cookie: manager, body: "solid nothing", headers: { "content-type": "text/plain", "x-filename": "x.stl" } });
    expect(bad.status).toBe(422);
    const notStl = await api("/api/quotes/geometry", { method: "POST", cookie: manager, body: "hello", headers: { "content-type": "image/png", "x-filename": "x.stl" } });
    expect(notStl.status).toBe(415);
  });

  it("spools the STL upload: the stored size and SHA-256 are the body's, and a body over the limit is 413", async () => {
    const body = writeBinaryStl(boxMesh(25, 15, 10));
    const res = await api("/api/quotes/geometry", { method: "POST", cookie: manager, body, headers: { "content-type": "model/stl", "x-filename": "spooled.stl" } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.file.triangles).toBe(12);
    const row = await db.selectFrom("files").select(["size_bytes", "sha256", "object_key"]).where("id", "=", res.body.file.id).executeTakeFirstOrThrow();
    expect(Number(row.size_bytes)).toBe(body.byteLength);
    expect(row.sha256).toBe(createHash("sha256").update(body).digest("hex"));
    expect(row.object_key).toMatch(/^geometry\/quotes\//);
    const before = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    const tooBig = await api("/api/quotes/geometry", { method: "POST", cookie: manager, body: new Uint8Array(getEnv().UPLOAD_MAX_BYTES + 1), headers: { "content-type": "application/octet-stream", "x-filename": "huge.stl" } });
    expect(tooBig.status).toBe(413);
    expect(tooBig.body.error.fieldErrors.file).toEqual(["over the size limit"]);
    const after = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
  }, 60_000);

  it("prices an uploaded STL, sends it with its PDF, accepts it once, and the applied plan meets the promise", async () => {
    const created = await api("/api/quotes", { method: "POST", cookie: manager, body: { customer: "Ostrander Valve Co.", contact_email: `buyer-${Date.now()}@ostrander.test` } });
    expect(created.status, JSON.stringify(created.body)).toBe(201);
    const q = created.body.quote;
    const fileId = await uploadBox();
    const mat = await material("17-4PH");

    const noWall = await api(`/api/quotes/${q.id}/lines`, { method: "POST", cookie: manager, body: { version: q.version, file_id: fileId, material_id: mat, quantity: 10 } });
    expect(noWall.status).toBe(422);
    expect(noWall.body.error.fieldErrors.thickest_wall_mm).toBeTruthy();
    const stale = await api(`/api/quotes/${q.id}/lines`, { method: "POST", cookie: manager, body: { version: q.version + 5, file_id: fileId, material_id: mat, quantity: 10, thickest_wall_mm: 6 } });
    expect(stale.status).toBe(409);
    const line = await api(`/api/quotes/${q.id}/lines`, { method: "POST", cookie: manager, body: { version: q.version, file_id: fileId, material_id: mat, quantity: 10, thickest_wall_mm: 6, stock_z_pos_mm: 0.5, target_ra_um: 1.6 } });
    expect(line.status, JSON.stringify(line.body)).toBe(201);
    expect(Number(line.body.line.nominal_x_mm)).toBeCloseTo(40, 3);
    expect(Number(line.body.line.volume_mm3)).toBeCloseTo(40 * 30 * 20, 0);

    const draft = await api(`/api/quotes/${q.id}`, { cookie: tech });
    expect(draft.status).toBe(200);
    const ev = draft.body.evaluated;
    expect(ev.feasible, JSON.stringify(ev.lines[0]?.promise)).toBe(true);
    expect(ev.total_minor).toBeGreaterThan(0);
    expect(Number.isInteger(ev.total_minor)).toBe(true);
    expect(ev.lines[0].cost.figures.map((f: { key: string }) => f.key)).toEqual(["feedstock", "printing", "wash", "furnace", "finishing", "inspection", "scrap", "subtotal", "overhead", "margin", "total"]);
    // nothing was booked by pricing
    expect(await db.selectFrom("builds").select("id").where("notes", "like", `Quote ${q.code}%`).execute()).toHaveLength(0);

    const v = draft.body.quote.version;
    expect((await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "send", version: v - 1 } })).status).toBe(409);
    const sent = await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "send", version: v } });
    expect(sent.status, JSON.stringify(sent.body)).toBe(200);
    expect(sent.body.quote.status).toBe("sent");
    const promiseAt = new Date(sent.body.quote.promise_at).getTime();

    const mail = await until("the quote e-mail", async () => {
      const r = await api(`/api/mail?to=${encodeURIComponent(q.contact_email)}`, { cookie: admin });
      return r.body.messages?.find((m: { subject: string }) => m.subject.includes(q.code));
    });
    expect(mail.attachments).toEqual([expect.objectContaining({ filename: `quote-${q.code}.pdf`, content_type: "application/pdf" })]);
    const pdf = await fetch(`${process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3100}`}/api/quotes/${q.id}/pdf`, { headers: { cookie: manager } });
    expect(pdf.headers.get("content-type")).toBe("application/pdf");
    expect(Buffer.from(await pdf.arrayBuffer()).subarray(0, 5).toString()).toBe("%PDF-");

    const version = sent.body.quote.version;
    expect((await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: tech, body: { action: "accept", version } })).status).toBe(403);
    const accepted = await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "accept", version } });
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
    const again = await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "accept", version: accepted.body.quote.version } });
    expect(again.status).toBe(409);

    const order = await db.selectFrom("orders").selectAll().where("id", "=", accepted.body.order.id).executeTakeFirstOrThrow();
    expect(new Date(order.due_at).getTime()).toBe(promiseAt);
    const units = await db.selectFrom("units as u").innerJoin("parts as p", "p.id", "u.part_id").select(["u.id", "u.build_id", "u.state"]).where("p.order_id", "=", order.id).execute();
    expect(units.length).toBe(ev.lines[0].quantity_to_start);
    expect(units.every((u) => u.state === "planned" && u.build_id)).toBe(true);
    // Offered, not booked: the builds are drafts until a planner applies the proposal.
    const buildIds = [...new Set(units.map((u) => u.build_id!))];
    expect((await db.selectFrom("builds").select("state").where("id", "in", buildIds).execute()).every((b) => b.state === "draft")).toBe(true);

    const applied = await api(`/api/plans/${accepted.body.plan_proposal_id}`, { method: "PATCH", cookie: tech, body: { decision: "apply" } });
    expect(applied.status, JSON.stringify(applied.body)).toBe(200);
    const booked = await db.selectFrom("builds").select(["state", "ends_at"]).where("id", "in", buildIds).execute();
    expect(booked.every((b) => b.state === "scheduled")).toBe(true);
    const printedAt = Math.max(...booked.map((b) => new Date(b.ends_at!).getTime()));

    // The rest of the chain from the booked prints, through the same planner, on the schedule as it
    // is now, from the moment the promise was made: the machinists' queue is counted from "now", so
    // a plan worked a few seconds later ends those seconds later.
    expect(sent.body.quote.sent_at).toBeTruthy();
    const ctx = await loadQuoteContext(db, new Date(sent.body.quote.sent_at));
    const { lines } = await getQuoteOrThrow(db, q.id);
    const spec = lineSpecOf(lines[0]);
    const m = ctx.materials.get(spec.material_id)!;
    const rest = planPromise({ ...promiseInputFor(spec, lineUnit(spec, m, ctx.rates), m, ctx, units.length, spec.quantity), printed_at: printedAt });
    expect(rest.feasible).toBe(true);
    if (rest.feasible) expect(new Date(rest.completion).getTime()).toBeLessThanOrEqual(promiseAt);
  }, 120_000);

  it("expires a sent quote past its validity on read, and then it cannot be accepted", async () => {
    const created = await api("/api/quotes", { method: "POST", cookie: manager, body: { customer: "Lapsed Ltd", contact_email: "lapsed@example.test" } });
    const q = created.body.quote;
    const part = await db.selectFrom("parts").select("id").limit(1).executeTakeFirstOrThrow();
    const line = await api(`/api/quotes/${q.id}/lines`, { method: "POST", cookie: manager, body: { version: q.version, part_id: part.id, quantity: 2 } });
    expect(line.status, JSON.stringify(line.body)).toBe(201);
    const sent = await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "send", version: q.version + 1 } });
    expect(sent.status, JSON.stringify(sent.body)).toBe(200);
    await db.updateTable("quotes").set({ valid_until: new Date(Date.now() - 60_000) }).where("id", "=", q.id).execute();
    const read = await api(`/api/quotes/${q.id}`, { cookie: manager });
    expect(read.body.quote.status).toBe("expired");
    const acc = await api(`/api/quotes/${q.id}/actions`, { method: "POST", cookie: manager, body: { action: "accept", version: read.body.quote.version } });
    expect(acc.status).toBe(409);
  }, 60_000);
});
