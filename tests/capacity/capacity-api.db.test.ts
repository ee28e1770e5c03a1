import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { appUrl } from "../helpers/browser";
import { zonedTimeToUtc } from "@/lib/process/time-zone";
import { makeOrder, makePart, makeUnit, tag } from "../finishing/fixtures";

// /api/capacity against a schedule of the test's own: a printer and a furnace nobody else
// books, in a week of February 2031 (no clock change in the shop's zone), with known answers.

const { db, close } = testDb();
let manager: string;
let technician: string;
let printer: { id: string; name: string };
let furnace: { id: string; name: string };
let lateOrder: string;
let timeZone: string;
const t = tag();
// Wall-clock time in the shop's zone → instant.
const local = (day: number, hour: number) => new Date(zonedTimeToUtc({ year: 2031, month: 2, day }, hour * 60, timeZone));

beforeAll(async () => {
  manager = await signIn(DEMO.manager);
  technician = await signIn(DEMO.technician);
  timeZone = (await db.selectFrom("shop_settings").select("time_zone").executeTakeFirstOrThrow()).time_zone;
  const material = await db.selectFrom("materials").select(["id"]).where("code", "=", "17-4PH").executeTakeFirstOrThrow();
  const profile = await db.selectFrom("sinter_profiles").select("id").orderBy("code").executeTakeFirstOrThrow();
  printer = await db
    .insertInto("printers")
    .values({ name: `Test printer ${t}`, build_x_mm: 300, build_y_mm: 200, build_z_mm: 200, deposition_cm3_per_h: 20 })
    .returning(["id", "name"])
    .executeTakeFirstOrThrow();
  furnace = await db
    .insertInto("furnaces")
    .values({ name: `Test kiln ${t}`, tray_x_mm: 300, tray_y_mm: 200, tray_count: 2, usable_height_mm: 100, max_load_g: 10000, max_cool_rate_c_per_min: 10 })
    .returning(["id", "name"])
    .executeTakeFirstOrThrow();
  // Monday 3 Feb: 06:00–18:00 (12 h); Tuesday 20:00 to Wednesday 08:00 (4 h + 8 h);
  // Thursday 06:00–12:00 after a 6 h maintenance window from midnight.
  const slots: Array<[number, number, number, number]> = [[3, 6, 3, 18], [4, 20, 5, 8], [6, 6, 6, 12]];
  for (const [i, [d1, h1, d2, h2]] of slots.entries()) {
    await db
      .insertInto("builds")
      .values({ code: `B-T${t}-${i}`, material_id: material.id, printer_id: printer.id, state: "scheduled", starts_at: local(d1, h1), ends_at: local(d2, h2), est_minutes: 60 })
      .execute();
  }
  await db.insertInto("maintenance_windows").values({ resource: "printer", printer_id: printer.id, starts_at: local(6, 0), ends_at: local(6, 6), reason: `service ${t}` }).execute();
  // Friday 12:00 to Saturday 12:00 in the furnace.
  await db
    .insertInto("furnace_runs")
    .values({ code: `R-T${t}`, furnace_id: furnace.id, profile_id: profile.id, state: "scheduled", starts_at: local(7, 12), ends_at: local(8, 12), cycle_minutes: 1440 })
    .execute();

  // An order already past due with a unit still to print: late whatever the schedule does.
  const order = await makeOrder(db, `WO-L${t}`, new Date(Date.now() - 2 * 86_400_000), "Late test customer");
  lateOrder = order.code;
  const part = await makePart(db, order.id, material.id, `LP-${t}`);
  const unit = await makeUnit(db, part.id, `${order.code}-01`, "planned");
  // Two units finished and one sintered in that week, for throughput.
  const done1 = await makeUnit(db, part.id, `${order.code}-02`, "done");
  const done2 = await makeUnit(db, part.id, `${order.code}-03`, "done");
  await db
    .insertInto("events")
    .values([
      { entity: "unit", entity_id: done1.id, kind: "state", from_state: "finishing", to_state: "done", created_at: local(4, 10) },
      { entity: "unit", entity_id: done2.id, kind: "state", from_state: "finishing", to_state: "done", created_at: local(9, 23) },
      { entity: "unit", entity_id: unit.id, kind: "state", from_state: "sintering", to_state: "sintered", created_at: local(5, 9) },
      // the next Monday: outside the range
      { entity: "unit", entity_id: done1.id, kind: "state", from_state: "finishing", to_state: "done", created_at: local(10, 0) },
    ])
    .execute();
});
afterAll(close);

const RANGE = "from=2031-02-03&to=2031-02-09";

describe("GET /api/capacity", () => {
  it("is for managers and admins only", async () => {
    expect((await api(`/api/capacity?${RANGE}`, { cookie: technician })).status).toBe(403);
    expect((await api(`/api/capacity?${RANGE}`)).status).toBe(401);
  });

  it("refuses a bad range with field errors", async () => {
    const backwards = await api("/api/capacity?from=2031-02-10&to=2031-02-01", { cookie: manager });
    expect(backwards.status).toBe(422);
    expect(backwards.body.error.fieldErrors.to).toBeDefined();
    const garbage = await api("/api/capacity?from=yesterday&to=2031-02-30", { cookie: manager });
    expect(garbage.status).toBe(422);
    expect(Object.keys(garbage.body.error.fieldErrors)).toEqual(expect.arrayContaining(["from", "to"]));
    const long = await api("/api/capacity?from=2031-01-01&to=2031-12-31", { cookie: manager });
    expect(long.status).toBe(422);
  });

  it("gives utilization per day and week with the hand-worked answers", async () => {
    const res = await api(`/api/capacity?${RANGE}`, { cookie: manager });
    expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
    const day = res.body.utilization.day.resources.find((r: { resource_id: string }) => r.resource_id === printer.id);
    expect(day.periods.map((p: { label: string }) => p.label)).toEqual(["2031-02-03", "2031-02-04", "2031-02-05", "2031-02-06", "2031-02-07", "2031-02-08", "2031-02-09"]);
    expect(day.periods.map((p: { busy_hours: number }) => p.busy_hours)).toEqual([12, 4, 8, 6, 0, 0, 0]);
    expect(day.periods.map((p: { available_hours: number }) => p.available_hours)).toEqual([24, 24, 24, 18, 24, 24, 24]);
    const week = res.body.utilization.week.resources.find((r: { resource_id: string }) => r.resource_id === printer.id);
    expect(week.periods).toHaveLength(1);
    expect(week.total.busy_hours).toBe(30);
    expect(week.total.available_hours).toBe(162);
    expect(week.total.utilization).toBeCloseTo(30 / 162, 12);
    const kiln = res.body.utilization.day.resources.find((r: { resource_id: string }) => r.resource_id === furnace.id);
    expect(kiln.periods.map((p: { busy_hours: number }) => p.busy_hours)).toEqual([0, 0, 0, 0, 12, 12, 0]);
  });

  it("counts booked hours ahead, throughput per week and lists the late order with its projection", async () => {
    const res = await api(`/api/capacity?${RANGE}`, { cookie: manager });
    const q = res.body.queue.find((r: { resource_id: string }) => r.resource_id === printer.id);
    expect(q).toMatchObject({ hours_ahead: 30, bookings_ahead: 3, booked_until: local(6, 12).toISOString() });
    expect(res.body.queue.find((r: { resource_id: string }) => r.resource_id === furnace.id).hours_ahead).toBe(24);
    expect(res.body.throughput).toEqual([{ week: "2031-02-03", start: local(3, 0).toISOString(), end: local(10, 0).toISOString(), done: 2, sintered: 1 }]);
    const order = res.body.orders.find((o: { code: string }) => o.code === lateOrder);
    expect(order).toMatchObject({ status: "late", latest_state: "planned", units_total: 3, units_done: 2 });
    expect(order.slack_minutes).toBeLessThan(-2 * 24 * 60);
    expect(new Date(order.projected_end).getTime()).toBeGreaterThan(Date.now());
    expect(res.body.wip.map((w: { state: string }) => w.state)).toContain("ready_for_finishing");
  });

  it("exports each table as CSV with the same figures", async () => {
    const res = await fetch(`${appUrl()}/api/capacity/export?${RANGE}&table=utilization-day`, { headers: { cookie: manager } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/text\/csv/);
    expect(res.headers.get("content-disposition")).toContain("hearth-utilization-day-2031-02-03-to-2031-02-09.csv");
    const lines = (await res.text()).trim().split(/\r?\n/);
    expect(lines[0]).toBe("resource,kind,day,available_h,busy_h,maintenance_h,utilization_pct");
    expect(lines).toContain(`${printer.name},printer,2031-02-06,18,6,6,33.3`);
    const orders = await (await fetch(`${appUrl()}/api/capacity/export?${RANGE}&table=orders`, { headers: { cookie: manager } })).text();
    expect(orders).toContain(`${lateOrder},Late test customer`);
    const bad = await api(`/api/capacity/export?${RANGE}&table=everything`, { cookie: manager });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.table).toBeDefined();
  });
});

describe("iCalendar feeds", () => {
  it("serves a resource's bookings behind a secret that can be revoked", async () => {
    expect((await api("/api/calendar/token", { method: "POST", cookie: technician })).status).toBe(403);
    const made = await api("/api/calendar/token", { method: "POST", cookie: manager });
    expect(made.status).toBe(201);
    const feed = made.body.feeds.find((f: { id: string }) => f.id === printer.id);
    expect(feed.url).toMatch(new RegExp(`/api/calendar/feeds/[A-Za-z0-9_-]{43}/${printer.id}\\.ics$`));
    const path = new URL(feed.url).pathname;
    // the database keeps only a hash of the secret
    const stored = await db.selectFrom("users").select("calendar_token").where("email", "=", DEMO.manager).executeTakeFirstOrThrow();
    expect(stored.calendar_token).not.toBe(made.body.token);
    expect(stored.calendar_token).toMatch(/^[0-9a-f]{64}$/);

    const res = await fetch(`${appUrl()}${path}`);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/text\/calendar/);
    const ics = await res.text();
    expect(ics.startsWith("BEGIN:VCALENDAR")).toBe(true);
    expect(ics).toContain("VERSION:2.0");
    expect(ics.match(/BEGIN:VEVENT/g)?.length).toBe(4); // three builds and the maintenance window
    expect(ics).toContain(`SUMMARY:Build B-T${t}-0 · 17-4PH`);
    expect(ics).toMatch(/UID:printer-[0-9a-f-]{36}@hearth/);
    expect(ics).toContain(`DTSTART:${local(3, 6).toISOString().replace(/[-:]/g, "").replace(/\.\d{3}/, "")}`);

    const status = await api("/api/calendar/token", { cookie: manager });
    expect(status.body.active).toBe(true);
    // a new secret ends the old addresses
    const again = await api("/api/calendar/token", { method: "POST", cookie: manager });
    expect((await fetch(`${appUrl()}${path}`)).status).toBe(404);
    const newPath = new URL(again.body.feeds.find((f: { id: string }) => f.id === printer.id).url).pathname;
    expect((await fetch(`${appUrl()}${newPath}`)).status).toBe(200);
    expect((await api("/api/calendar/token", { method: "DELETE", cookie: manager })).body).toMatchObject({ active: false, revoked: true });
    expect((await fetch(`${appUrl()}${newPath}`)).status).toBe(404);
    expect((await fetch(`${appUrl()}/api/calendar/feeds/not-a-token/${printer.id}.ics`)).status).toBe(404);
  });
});
