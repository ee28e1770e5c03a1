// The shop-wide activity log against the running app: filters, who may read it, the page, and the
// CSV export neutralising formula text (OWASP "CSV Injection", through lib/csv/safe-cell.ts).
import { randomUUID } from "node:crypto";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { ACTIVITY_CSV_FIELDS } from "@/lib/activity/schemas";

const { db, close } = testDb();
const stamp = Date.now().toString(36);
const who = `Activity Tester ${stamp}`;
const record = randomUUID();
const other = randomUUID();
let actorId: string;
let manager: string;
let technician: string;
let admin: string;

beforeAll(async () => {
  [manager, technician, admin] = await Promise.all([signIn(DEMO.manager), signIn(DEMO.technician), signIn(DEMO.admin)]);
  actorId = (await db.insertInto("users").values({ email: `activity-${stamp}@test.hearth.test`, name: who, role: "technician" }).returning("id").executeTakeFirstOrThrow()).id;
  const day = (d: string) => new Date(`${d}T12:00:00Z`);
  await db
    .insertInto("events")
    .values([
      { entity: "unit", entity_id: record, kind: "state", from_state: "brown", to_state: "sintering", actor_id: actorId, reason: '=HYPERLINK("http://evil.example","x")', created_at: day("2026-11-02") },
      { entity: "unit", entity_id: record, kind: "state", from_state: "sintering", to_state: "sintered", actor_id: actorId, reason: "+1 and -2", created_at: day("2026-11-03") },
      { entity: "build", entity_id: other, kind: "schedule", from_state: "draft", to_state: "scheduled", actor_id: actorId, reason: "@SUM(A1)", created_at: day("2026-11-04") },
      // a person's own security event: the security log's, never this one
      { entity: "user", entity_id: actorId, kind: "sign_in", actor_id: actorId, reason: null, data: JSON.stringify({ ip: "192.0.2.9" }), created_at: day("2026-11-04") },
    ])
    .execute();
});
afterAll(async () => {
  await db.updateTable("users").set({ active: false }).where("id", "=", actorId).execute();
  await close();
});

describe("the activity log", () => {
  it("filters by person, record type, record and dates, newest first, without security events", async () => {
    const all = await api(`/api/activity?user=${encodeURIComponent(who)}`, { cookie: manager });
    expect(all.status, JSON.stringify(all.body)).toBe(200);
    expect(all.body.total).toBe(3);
    expect(all.body.events.map((e: { entity: string; kind: string }) => `${e.entity}:${e.kind}`)).toEqual(["build:schedule", "unit:state", "unit:state"]);
    const units = await api(`/api/activity?user=${encodeURIComponent(who)}&entity=unit`, { cookie: manager });
    expect(units.body.total).toBe(2);
    const one = await api(`/api/activity?record=${other}`, { cookie: manager });
    expect(one.body.events.map((e: { entity_id: string }) => e.entity_id)).toEqual([other]);
    const dated = await api(`/api/activity?user=${encodeURIComponent(who)}&from=2026-11-03&to=2026-11-03`, { cookie: manager });
    expect(dated.body.events.map((e: { to_state: string }) => e.to_state)).toEqual(["sintered"]);
    // empty fields from a plain form mean no filter
    expect((await api(`/api/activity?user=${encodeURIComponent(who)}&kind=&entity=`, { cookie: manager })).body.total).toBe(3);
  });

  it("refuses a bad filter with field and reason", async () => {
    const res = await api("/api/activity?from=2026-13-40&entity=spaceship&record=12", { cookie: manager });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors)).toEqual(expect.arrayContaining(["from", "entity", "record"]));
    expect((await api("/api/activity?from=2026-11-05&to=2026-11-01", { cookie: manager })).status).toBe(422);
  });

  it("is for managers and admins only", async () => {
    expect((await api("/api/activity", { cookie: technician })).status).toBe(403);
    expect((await api("/api/activity/export", { cookie: technician })).status).toBe(403);
    expect((await api("/api/activity")).status).toBe(401);
    expect((await api("/api/activity", { cookie: admin })).status).toBe(200);
  });

  it("exports the filtered rows as formula-safe CSV and notes the export in the security log", async () => {
    const csv = await api(`/api/activity/export?user=${encodeURIComponent(who)}&entity=unit`, { cookie: manager });
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-type")).toContain("text/csv");
    expect(csv.headers.get("content-disposition")).toMatch(/attachment; filename="activity-\d{4}-\d{2}-\d{2}\.csv"/);
    const parsed = Papa.parse<Record<string, string>>(csv.body as unknown as string, { header: true, skipEmptyLines: true });
    expect(parsed.meta.fields).toEqual([...ACTIVITY_CSV_FIELDS]);
    expect(parsed.data.map((r) => r.reason)).toEqual(["'+1 and -2", `'=HYPERLINK("http://evil.example","x")`]);
    expect(parsed.data.every((r) => r.who === who && r.record_id === record)).toBe(true);
    // the raw text quotes a neutralised cell, as OWASP asks
    expect(csv.body as unknown as string).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    const logged = await db.selectFrom("events").select(["reason", "data"]).where("entity", "=", "user").where("kind", "=", "export").where("reason", "=", "activity log").orderBy("id", "desc").executeTakeFirstOrThrow();
    expect(logged.data).toMatchObject({ user: who, entity: "unit", rows: 2 });
  });

  it("shows the page to a manager with the same rows", async () => {
    const res = await fetch(`${appUrl()}/activity?user=${encodeURIComponent(who)}`, { headers: { cookie: manager } });
    expect(res.status).toBe(200);
    const html = await res.text();
    expect(html).toContain("3 changes.");
    expect(html).toContain("sintering → sintered");
    expect(html).not.toContain("192.0.2.9");
  });
});
