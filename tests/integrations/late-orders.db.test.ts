// The "order.late" webhook event against the running app, its worker and the local webhook
// receiver: an order whose due date has passed with unfinished units is reported once, however
// many passes and workers look, and again only after its due date is moved and passes again.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { recordLateOrders } from "@/db/orders/late";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";

const receiver = process.env.WEBHOOK_RECEIVER_URL ?? `http://127.0.0.1:${process.env.WEBHOOK_RECEIVER_PORT ?? 2527}`;
const { db, close } = testDb();
// a second pool: a second worker's own connections
const other = testDb();
const stamp = Date.now().toString(36);
let admin: string;

type Received = { event_id: string; type: string; verified: boolean; body: { id: string; type: string; data: Record<string, unknown> } };
const received = async (name: string): Promise<Received[]> => (await (await fetch(`${receiver}/_fake/hooks/${name}`)).json()).deliveries;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function waitFor<T>(what: string, fn: () => Promise<T | undefined | false>, ms = 20_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await sleep(250);
  }
}

async function orderWithUnits(code: string, quantity: number) {
  const material = await db.selectFrom("materials").select("id").where("code", "=", "316L").executeTakeFirstOrThrow();
  const order = await api("/api/orders", { method: "POST", cookie: admin, body: { code, customer: "Late test", due_at: new Date(Date.now() + 5 * 86_400_000).toISOString() } });
  expect(order.status, JSON.stringify(order.body)).toBe(201);
  const part = await api("/api/parts", {
    method: "POST",
    cookie: admin,
    body: {
      order_id: order.body.order.id, part_number: `${code}-P`, name: "Bracket", material_id: material.id, quantity, nominal_x_mm: 20, nominal_y_mm: 10, nominal_z_mm: 5, thickest_wall_mm: 3,
      stock_x_neg_mm: 0, stock_x_pos_mm: 0, stock_y_neg_mm: 0, stock_y_pos_mm: 0, stock_z_neg_mm: 0, stock_z_pos_mm: 0, target_ra_um: null, tolerance_um: null, tolerance_grade: null,
    },
  });
  expect(part.status, JSON.stringify(part.body)).toBe(201);
  return { id: order.body.order.id as string, partId: part.body.part.id as string };
}

/** Moves the due date by `offset` (an interval such as "-2 days") from now. */
const setDue = (id: string, offset: string) => db.updateTable("orders").set({ due_at: sql<Date>`now() + ${offset}::interval` }).where("id", "=", id).execute();

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
});
afterAll(async () => {
  await db.updateTable("webhook_endpoints").set({ active: false }).where("description", "like", "test late-%").execute();
  await other.close();
  await close();
});

describe("order.late", () => {
  it("is listed among the webhook events the API describes and an endpoint can subscribe to", async () => {
    const doc = await api("/api/openapi.json", { cookie: admin });
    expect(Object.keys(doc.body.webhooks)).toContain("order.late");
    const bad = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: `${receiver}/hooks/x`, events: ["order.nonsense"] } });
    expect(bad.status).toBe(422);
  });

  it("a past-due order with unfinished units sends exactly one delivery, with the job run twice by two workers", async () => {
    const name = `late-${stamp}-a`;
    const reg = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: `${receiver}/hooks/${name}`, description: `test ${name}`, events: ["order.late"] } });
    expect(reg.status, JSON.stringify(reg.body)).toBe(201);
    const secretSet = await fetch(`${receiver}/_fake/hooks/${name}`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ secret: reg.body.endpoint.secret }) });
    expect(secretSet.status).toBe(200);

    const late = await orderWithUnits(`LATE-${stamp}-A`, 2);
    const done = await orderWithUnits(`LATE-${stamp}-B`, 1);
    const future = await orderWithUnits(`LATE-${stamp}-C`, 1);
    await setDue(late.id, "-2 days");
    await setDue(done.id, "-2 days");
    // an order whose every unit is done is not late, however old its due date
    await db.updateTable("units").set({ state: "done" }).where("part_id", "=", done.partId).execute();

    // two workers, each running the job twice, at once; the stack's own worker may join in
    const [a, b] = await Promise.all([
      (async () => [await recordLateOrders(db), await recordLateOrders(db)])(),
      (async () => [await recordLateOrders(other.db), await recordLateOrders(other.db)])(),
    ]);
    const noticed = [...a, ...b].flatMap((r) => r.noticed).filter((id) => [late.id, done.id, future.id].includes(id));
    expect(noticed.filter((id) => id === late.id).length).toBeLessThanOrEqual(1);
    expect(noticed).not.toContain(done.id);
    expect(noticed).not.toContain(future.id);

    // the notice's transaction wrote the delivery and its pg-boss job; the stack's worker sends it
    const delivery = await db
      .selectFrom("webhook_deliveries as d")
      .innerJoin("webhook_events as ev", "ev.id", "d.event_id")
      .select(["d.id", "d.job_id"])
      .where("ev.type", "=", "order.late")
      .where("ev.entity_id", "=", late.id)
      .execute();
    expect(delivery).toHaveLength(1);
    const job = await sql<{ name: string; data: { delivery_id: string } }>`select name, data from pgboss.job where id = ${delivery[0].job_id}`.execute(db);
    expect(job.rows).toEqual([{ name: "deliver-webhook", data: { delivery_id: delivery[0].id } }]);
    const got = await waitFor("the delivery", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === late.id);
      return r.length ? r : undefined;
    });
    // time for a duplicate to arrive, had there been one
    await recordLateOrders(db);
    await sleep(3000);
    const all = await received(name);
    expect(all.filter((d) => d.body.data?.id === late.id)).toHaveLength(1);
    expect(all.some((d) => d.body.data?.id === done.id || d.body.data?.id === future.id)).toBe(false);
    expect(got[0]).toMatchObject({ type: "order.late", verified: true });
    expect(got[0].body.data).toMatchObject({ entity: "order", id: late.id, code: `LATE-${stamp}-A`, units_total: 2, units_done: 0 });
    // one notice and one activity log entry
    expect(await db.selectFrom("order_late_notices").select("due_at").where("order_id", "=", late.id).execute()).toHaveLength(1);
    expect(await db.selectFrom("events").select("id").where("entity", "=", "order").where("entity_id", "=", late.id).where("kind", "=", "late").execute()).toHaveLength(1);
  });

  it("fires again when the due date is moved later and passes again, not before", async () => {
    const order = await orderWithUnits(`LATE-${stamp}-D`, 1);
    await setDue(order.id, "-3 days");
    expect((await recordLateOrders(db)).noticed).toContain(order.id);
    // moved into the future: not late
    await setDue(order.id, "3 days");
    expect((await recordLateOrders(db)).noticed).not.toContain(order.id);
    // and that later date passes too
    await setDue(order.id, "-1 hour");
    expect((await recordLateOrders(db)).noticed).toContain(order.id);
    expect((await recordLateOrders(db)).noticed).not.toContain(order.id);
    expect(await db.selectFrom("order_late_notices").select("due_at").where("order_id", "=", order.id).execute()).toHaveLength(2);
  });
});
