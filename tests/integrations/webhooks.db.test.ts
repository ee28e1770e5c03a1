// Outgoing webhooks against the running app, its worker and the local webhook receiver
// (scripts/fakes/webhook-receiver.ts), which checks each signature with the documented scheme.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { deliverDueWebhooks, webhookConfig } from "@/worker/webhooks";
import { hmacSha256Hex, signatureHeader, verifySignature } from "@/lib/integrations/webhook-signature";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";

const receiver = process.env.WEBHOOK_RECEIVER_URL ?? `http://127.0.0.1:${process.env.WEBHOOK_RECEIVER_PORT ?? 2527}`;
const { db, close } = testDb();
let admin: string;
const stamp = Date.now().toString(36);

type Received = { event_id: string; type: string; verified: boolean; reason: string | null; status: number; body: { id: string; type: string; data: Record<string, unknown> } };

async function received(name: string): Promise<Received[]> {
  return (await (await fetch(`${receiver}/_fake/hooks/${name}`)).json()).deliveries;
}
async function configure(name: string, cfg: Record<string, unknown>) {
  const res = await fetch(`${receiver}/_fake/hooks/${name}`, { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify(cfg) });
  expect(res.status).toBe(200);
}
async function waitFor<T>(what: string, fn: () => Promise<T | undefined | false>, ms = 20_000): Promise<T> {
  const until = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** Registers an endpoint at the receiver under `name` and tells the receiver its secret. */
async function register(name: string, events: string[], cfg: Record<string, unknown> = {}) {
  const res = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: `${receiver}/hooks/${name}`, description: `test ${name}`, events } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  expect(res.body.endpoint.secret).toMatch(/^whsec_/);
  await configure(name, { secret: res.body.endpoint.secret, ...cfg });
  return res.body.endpoint as { id: string; secret: string; version: number };
}

async function createOrder(code: string) {
  const res = await api("/api/orders", { method: "POST", cookie: admin, body: { code, customer: "Webhook test", due_at: new Date(Date.now() + 20 * 86_400_000).toISOString() } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.order as { id: string };
}

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
});
afterAll(async () => {
  // leave no endpoint behind to receive other tests' events
  await db.updateTable("webhook_endpoints").set({ active: false }).where("description", "like", "test wh-%").execute();
  await close();
});

describe("signature scheme", () => {
  it("verifies its own signature and refuses a changed body, a wrong secret and an old timestamp", () => {
    const now = 1_800_000_000;
    const h = signatureHeader("whsec_a", now, '{"a":1}');
    expect(verifySignature("whsec_a", h, '{"a":1}', now)).toEqual({ ok: true, timestamp: now });
    expect(verifySignature("whsec_a", h, '{"a":2}', now).ok).toBe(false);
    expect(verifySignature("whsec_b", h, '{"a":1}', now).ok).toBe(false);
    expect(verifySignature("whsec_a", h, '{"a":1}', now + 301).ok).toBe(false);
    // RFC 4231 §4.3, test case 2: HMAC-SHA-256(key "Jefe", "what do ya want for nothing?")
    expect(hmacSha256Hex("Jefe", "what do ya want for nothing?")).toBe("5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843");
    expect(h).toBe(`t=${now},v1=${hmacSha256Hex("whsec_a", `${now}.{"a":1}`)}`);
  });
});

describe("deliveries", () => {
  it("an order created sends one signed delivery the receiver verifies", async () => {
    const name = `wh-${stamp}-a`;
    const ep = await register(name, ["order.created"]);
    const order = await createOrder(`WH-${stamp}-A`);
    const [got] = await waitFor("the delivery", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length ? r : undefined;
    });
    expect(got).toMatchObject({ type: "order.created", verified: true, status: 204 });
    expect(got.body).toMatchObject({ type: "order.created", data: { entity: "order", id: order.id, code: `WH-${stamp}-A` } });
    expect(got.event_id).toBe(got.body.id);
    const log = await waitFor("the log", async () => {
      const r = await api(`/api/webhooks/${ep.id}/deliveries`, { cookie: admin });
      return r.body.deliveries.find((d: { state: string }) => d.state === "delivered");
    });
    expect(log).toMatchObject({ type: "order.created", last_status: 204, attempts: 1 });
  });

  it("retries after a 500 from the receiver, with the same event id, and a redelivery can be asked for", async () => {
    const name = `wh-${stamp}-b`;
    const ep = await register(name, ["order.created"], { fail_next: 1, fail_status: 500 });
    const order = await createOrder(`WH-${stamp}-B`);
    const first = await waitFor("the failed attempt", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("endpoint_id", "=", ep.id).executeTakeFirst();
      return r && r.state === "pending" && r.attempts === 1 ? r : undefined;
    });
    expect(first.last_status).toBe(500);
    expect(first.next_attempt_at.getTime()).toBeGreaterThan(Date.now());
    // the back-off wait passes (instead of waiting out 30 s)
    await db.updateTable("webhook_deliveries").set({ next_attempt_at: sql`now()` }).where("id", "=", first.id).execute();
    const both = await waitFor("the retry", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length === 2 ? r : undefined;
    });
    expect(both.map((d) => d.status)).toEqual([500, 204]);
    expect(both.every((d) => d.verified)).toBe(true);
    expect(both[0].event_id).toBe(both[1].event_id);
    const done = await db.selectFrom("webhook_deliveries").selectAll().where("id", "=", first.id).executeTakeFirstOrThrow();
    expect(done).toMatchObject({ state: "delivered", attempts: 2, last_status: 204 });
    const attempts = await db.selectFrom("webhook_attempts").select("status").where("delivery_id", "=", first.id).orderBy("attempted_at").execute();
    expect(attempts.map((a) => a.status)).toEqual([500, 204]);

    expect((await api(`/api/webhook-deliveries/${first.id}/redeliver`, { method: "POST", cookie: admin })).status).toBe(202);
    const three = await waitFor("the redelivery", async () => {
      const r = (await received(name)).filter((d) => d.body.data?.id === order.id);
      return r.length === 3 ? r : undefined;
    });
    expect(three[2]).toMatchObject({ event_id: both[0].event_id, verified: true });
  });

  it("a change that rolls back sends nothing", async () => {
    const name = `wh-${stamp}-c`;
    const ep = await register(name, ["order.created"]);
    await expect(
      db.transaction().execute(async (trx) => {
        await trx.insertInto("orders").values({ code: `WH-${stamp}-C`, customer: "rolled back", due_at: new Date() }).execute();
        expect(await trx.selectFrom("webhook_deliveries").select("id").where("endpoint_id", "=", ep.id).execute()).toHaveLength(1);
        throw new Error("roll back");
      }),
    ).rejects.toThrow("roll back");
    expect(await db.selectFrom("webhook_deliveries").select("id").where("endpoint_id", "=", ep.id).execute()).toHaveLength(0);
  });

  it("exactly one delivery per event with several workers racing", async () => {
    const name = `wh-${stamp}-d`;
    const ep = await register(name, ["order.created"], { delay_ms: 50 });
    // 12 events at once; the app's worker and two more delivery passes in this process race for them
    const codes = Array.from({ length: 12 }, (_, i) => `WH-${stamp}-D${i}-${randomUUID().slice(0, 4)}`);
    await db.insertInto("orders").values(codes.map((code) => ({ code, customer: "race", due_at: new Date() }))).execute();
    const cfg = { ...webhookConfig(), batch: 3 };
    const passes = async () => {
      for (let i = 0; i < 8; i++) await deliverDueWebhooks(db, cfg);
    };
    await Promise.all([passes(), passes()]);
    const got = await waitFor("all 12", async () => {
      const r = await received(name);
      return r.length >= 12 ? r : undefined;
    });
    await new Promise((r) => setTimeout(r, 2500)); // give a duplicate time to show up
    const again = await received(name);
    expect(again.length).toBe(12);
    expect(new Set(again.map((d) => d.event_id)).size).toBe(12);
    expect(got.every((d) => d.verified)).toBe(true);
    const rows = await db.selectFrom("webhook_deliveries").select(["state", "attempts"]).where("endpoint_id", "=", ep.id).execute();
    expect(rows.every((r) => r.state === "delivered" && r.attempts === 1)).toBe(true);
  });

  it("pauses an endpoint that has failed for a day and mails the admin once", async () => {
    const name = `wh-${stamp}-e`;
    const ep = await register(name, ["order.created"], { fail_next: 100, fail_status: 503 });
    await createOrder(`WH-${stamp}-E`);
    const d = await waitFor("a failed attempt", async () => {
      const r = await db.selectFrom("webhook_deliveries").selectAll().where("endpoint_id", "=", ep.id).executeTakeFirst();
      return r && r.attempts >= 1 && r.state === "pending" ? r : undefined;
    });
    // it has been failing for a day: the next failure pauses it
    await db.updateTable("webhook_endpoints").set({ failing_since: new Date(Date.now() - 25 * 3600_000) }).where("id", "=", ep.id).execute();
    await db.updateTable("webhook_deliveries").set({ next_attempt_at: sql`now()` }).where("id", "=", d.id).execute();
    const paused = await waitFor("the pause", async () => {
      const r = await db.selectFrom("webhook_endpoints").selectAll().where("id", "=", ep.id).executeTakeFirstOrThrow();
      return r.paused_at ? r : undefined;
    });
    expect(paused.pause_mailed_at).not.toBeNull();
    const mail = await db.selectFrom("notification_outbox").select(["recipient_email", "subject"]).where("subject_key", "like", `webhook_endpoint:${ep.id}:%`).execute();
    expect(mail).toEqual([{ recipient_email: DEMO.admin, subject: "A webhook endpoint was paused" }]);
    // resuming clears the pause
    const res = await api(`/api/webhooks/${ep.id}`, { method: "PATCH", cookie: admin, body: { version: paused.version, resume: true } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.endpoint.paused_at).toBeNull();
    const stale = await api(`/api/webhooks/${ep.id}`, { method: "PATCH", cookie: admin, body: { version: paused.version, active: false } });
    expect(stale.status).toBe(409);
  });

  it("refuses a bad endpoint with field and reason", async () => {
    const res = await api("/api/webhooks", { method: "POST", cookie: admin, body: { url: "ftp://example.test/x", events: ["nope"] } });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors)).toEqual(expect.arrayContaining(["url", "events.0"]));
  });
});
