// The probes that once got through, against the running app (scripts/serve.ts in front of the
// build), each with the answer it must get now.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/permissions";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { rawRequest } from "../helpers/raw-request";
import { DEMO, api, signIn } from "../helpers/session";
import { makeOrder, makePart } from "../floor/fixtures";

const { db, close } = testDb();
const stamp = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;
const PASSWORD = `pw-${randomUUID()}`;
let hash: Promise<string> | undefined;
let seq = 0;
let admin: string;

async function makeUser(role: Role) {
  const email = `hard-${role}-${stamp}-${++seq}@test.hearth.test`;
  const row = await db
    .insertInto("users")
    .values({ email, name: `Hardening ${role} ${seq}`, role, password_hash: await (hash ??= hashPassword(PASSWORD)) })
    .returning(["id", "version"])
    .executeTakeFirstOrThrow();
  return { ...row, email, cookie: () => signIn(email, PASSWORD) };
}

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
});
afterAll(async () => {
  await db.updateTable("users").set({ active: false }).where("email", "like", `hard-%-${stamp}-%`).execute();
  await close();
});

describe("sessions end on the server", () => {
  it("a cookie copied before sign-out stops working at once, pages and the floor's direct path alike", async () => {
    const u = await makeUser("technician");
    const cookie = await u.cookie();
    const copy = cookie;
    expect((await api("/api/me", { cookie: copy })).status).toBe(200);
    const floor = `/api/floor?from=${encodeURIComponent("2031-01-05T00:00:00.000Z")}&to=${encodeURIComponent("2031-01-12T00:00:00.000Z")}`;
    expect((await api(floor, { cookie: copy })).status).toBe(200);
    expect((await api("/api/session", { method: "DELETE", cookie })).status).toBe(200);
    expect((await api("/api/me", { cookie: copy })).status).toBe(401);
    expect((await api(floor, { cookie: copy })).status).toBe(401);
    const page = await fetch(`${appUrl()}/floor`, { headers: { cookie: copy }, redirect: "manual" });
    expect(page.status).toBe(307);
    expect(page.headers.get("location")).toContain("/sign-in");
  });

  it("lists open sessions and signs out the others, keeping this one", async () => {
    const u = await makeUser("machinist");
    const a = await u.cookie();
    const b = await u.cookie();
    const listed = await api("/api/me/sessions", { cookie: a });
    expect(listed.status).toBe(200);
    expect(listed.body.sessions).toHaveLength(2);
    expect(listed.body.sessions.filter((s: { current: boolean }) => s.current)).toHaveLength(1);
    const ended = await api("/api/me/sessions", { method: "DELETE", cookie: a });
    expect(ended.body.sessions_ended).toBe(1);
    expect((await api("/api/me", { cookie: a })).status).toBe(200);
    expect((await api("/api/me", { cookie: b })).status).toBe(401);
    const page = await fetch(`${appUrl()}/settings`, { headers: { cookie: a } });
    expect(await page.text()).toContain("Sign out other sessions");
  });

  it("an admin's sign out everywhere, a role change and a password change end every session", async () => {
    const u = await makeUser("technician");
    const one = await u.cookie();
    const res = await api(`/api/users/${u.id}/sessions`, { method: "DELETE", cookie: admin });
    expect(res.status).toBe(200);
    expect(res.body.sessions_ended).toBe(1);
    expect((await api("/api/me", { cookie: one })).status).toBe(401);

    const two = await u.cookie();
    const v = (await db.selectFrom("users").select("version").where("id", "=", u.id).executeTakeFirstOrThrow()).version;
    expect((await api(`/api/users/${u.id}`, { method: "PATCH", cookie: admin, body: { version: v, role: "machinist" } })).status).toBe(200);
    expect((await api("/api/me", { cookie: two })).status).toBe(401);

    const three = await u.cookie();
    const other = await u.cookie();
    const changed = await fetch(`${appUrl()}/api/me/password`, {
      method: "POST",
      headers: { cookie: three, "content-type": "application/json" },
      body: JSON.stringify({ current_password: PASSWORD, new_password: `${PASSWORD}-new`, confirm: `${PASSWORD}-new` }),
    });
    expect(changed.status).toBe(200);
    expect((await api("/api/me", { cookie: other })).status).toBe(401);
    expect((await api("/api/me", { cookie: three })).status).toBe(401); // the old cookie of the changing browser too
    const renewed = changed.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))!.split(";")[0];
    expect((await api("/api/me", { cookie: renewed })).status).toBe(200);

    const kinds = await db.selectFrom("events").select(["kind", "reason"]).where("entity", "=", "user").where("entity_id", "=", u.id).execute();
    expect(kinds.filter((k) => k.kind === "sessions_revoked").map((k) => k.reason)).toEqual(expect.arrayContaining(["sign_out_everywhere", "role_change"]));
  });
});

describe("the way back after sign-in", () => {
  it.each(["/\\evil.example/", "/%5Cevil.example/", "/%09/evil.example/", "/%0A/evil.example/", "//evil.example/"])("is dropped for %s", async (next) => {
    const res = await rawRequest(appUrl(), `/sign-in?next=${next}`);
    expect(res.status).toBe(200);
    // the form's way back (its props in the page's payload) is empty; the address itself
    // appears in the payload's route tree, which nothing follows
    const html = res.bytes.toString();
    expect(html).toContain('\\"next\\":\\"\\"');
    expect(html).not.toMatch(/\\"next\\":\\"[^\\]/);
  });
});

describe("input the database cannot store is a 4xx with the field", () => {
  it("a duplicate printer name is a 409 naming the field", async () => {
    const body = { name: `Dup printer ${stamp}`, build_x_mm: 200, build_y_mm: 150, build_z_mm: 120, deposition_cm3_per_h: 12, layer_height_mm: 0.2, layer_overhead_s: 6 };
    expect((await api("/api/printers", { method: "POST", cookie: admin, body })).status).toBe(201);
    const again = await api("/api/printers", { method: "POST", cookie: admin, body });
    expect(again.status).toBe(409);
    expect(again.body.error.fieldErrors).toHaveProperty("name");
  });

  it("NUL bytes, huge versions, far years, malformed escapes and near-uuids", async () => {
    const nul = await api("/api/orders", { method: "POST", cookie: admin, body: { code: `N${stamp}`, customer: "A\u0000B", due_at: "2031-01-01" } });
    expect(nul.status).toBe(422);
    expect(nul.body.error.fieldErrors).toHaveProperty("customer");
    const order = (await db.selectFrom("orders").select(["id"]).limit(1).executeTakeFirstOrThrow()).id;
    const big = await api(`/api/orders/${order}`, { method: "PATCH", cookie: admin, body: { version: 2147483648, notes: "x" } });
    expect(big.status).toBe(422);
    const far = await api("/api/orders", { method: "POST", cookie: admin, body: { code: `F${stamp}`, customer: "Far", due_at: "294277-01-01" } });
    expect(far.status).toBe(422);
    expect((await rawRequest(appUrl(), "/api/builds/%E0%A4%A", { cookie: admin })).status).toBe(400);
    for (const path of ["/api/inspections/0000000000000000000000000000000-----", "/api/units/0000000000000000000000000000000-----/trace", "/api/files/0000000000000000000000000000000-----"]) {
      const res = await api(path, { cookie: admin });
      expect(res.status, path).toBeLessThan(500);
      expect(res.status, path).toBeGreaterThanOrEqual(400);
    }
  });
});

describe("JSON bodies and cross-site requests", () => {
  it("refuses a body over JSON_MAX_BYTES with 413 and a non-JSON type with 415", async () => {
    const huge = JSON.stringify({ notes: "x".repeat(2 * 1024 * 1024) });
    const res = await api("/api/orders", { method: "POST", cookie: admin, body: huge, headers: { "content-type": "application/json" } });
    expect(res.status).toBe(413);
    const plain = await api("/api/orders", { method: "POST", cookie: admin, body: JSON.stringify({ code: "X" }), headers: { "content-type": "text/plain" } });
    expect(plain.status).toBe(415);
    expect(plain.body.error.message).toContain("application/json");
  });

  it("refuses a foreign Origin and a cross-site fetch with 403, on route handlers and server actions", async () => {
    const foreign = await api("/api/orders", { method: "POST", cookie: admin, body: { code: "X" }, headers: { origin: "https://evil.example" } });
    expect(foreign.status).toBe(403);
    const site = await api("/api/session", { method: "DELETE", cookie: admin, headers: { "sec-fetch-site": "cross-site" } });
    expect(site.status).toBe(403);
    expect((await api("/api/me", { cookie: admin })).status).toBe(200); // the sign-out did not happen
    const action = await fetch(`${appUrl()}/setup/users`, { method: "POST", headers: { cookie: admin, origin: "https://evil.example", "next-action": "0".repeat(40), "content-type": "text/plain" }, body: "[]", redirect: "manual" });
    expect(action.status).toBe(403);
    const same = await api("/api/me", { method: "PATCH", cookie: admin, body: { unit_pref: "mm" }, headers: { origin: appUrl() } });
    expect(same.status).toBe(200);
  });
});

describe("headers, health, client address, field rules, exports", () => {
  it("every answer carries the security headers; pages carry a nonce CSP", async () => {
    const page = await rawRequest(appUrl(), "/sign-in");
    const csp = String(page.headers["content-security-policy"]);
    expect(csp).toMatch(/script-src 'self' 'nonce-[A-Za-z0-9+/=]+' 'strict-dynamic'/);
    expect(csp).toContain("frame-ancestors 'none'");
    const nonce = /'nonce-([^']+)'/.exec(csp)![1];
    expect(page.bytes.toString()).toContain(`nonce="${nonce}"`);
    for (const res of [page, await rawRequest(appUrl(), "/api/health"), await rawRequest(appUrl(), "/api/floor?from=x", { cookie: admin })]) {
      expect(res.headers["x-content-type-options"]).toBe("nosniff");
      expect(res.headers["referrer-policy"]).toBe("strict-origin-when-cross-origin");
      expect(String(res.headers["permissions-policy"])).toContain("camera=(self)");
    }
  });

  it("health tells the public only up or down", async () => {
    const res = await api("/api/health");
    expect(res.body).toEqual({ status: "up" });
    const tech = await api("/api/health", { cookie: await signIn(DEMO.technician) });
    expect(tech.body).toEqual({ status: "up" });
    expect((await api("/api/health", { cookie: admin })).body.checks.database.ok).toBe(true);
  });

  it("a client cannot name its own address through the peer header", async () => {
    const email = `nobody-${stamp}@test.hearth.test`;
    await rawRequest(appUrl(), "/api/session", { "x-hearth-peer": "203.0.113.99" }, "POST").catch(() => undefined);
    await fetch(`${appUrl()}/api/session`, { method: "POST", headers: { "content-type": "application/json", "x-hearth-peer": "203.0.113.99" }, body: JSON.stringify({ email, password: "wrong-password" }) });
    const ev = await db.selectFrom("events").select("data").where("kind", "=", "sign_in_failed").where(sql`data->>'email'`, "=", email).executeTakeFirstOrThrow();
    expect((ev.data as { ip: string }).ip).not.toBe("203.0.113.99");
    expect(["127.0.0.1", "::1"]).toContain((ev.data as { ip: string }).ip);
  });

  it("a technician creates an order at the default priority only", async () => {
    const tech = await signIn(DEMO.technician);
    const urgent = await api("/api/orders", { method: "POST", cookie: tech, body: { code: `P1-${stamp}`, customer: "C", due_at: "2031-01-01", priority: 1 } });
    expect(urgent.status).toBe(403);
    expect(urgent.body.error.fieldErrors).toHaveProperty("priority");
    expect((await api("/api/orders", { method: "POST", cookie: tech, body: { code: `P3-${stamp}`, customer: "C", due_at: "2031-01-01" } })).status).toBe(201);
    const manager = await signIn(DEMO.manager);
    expect((await api("/api/orders", { method: "POST", cookie: manager, body: { code: `M1-${stamp}`, customer: "C", due_at: "2031-01-01", priority: 1 } })).status).toBe(201);
  });

  it("the capacity export neutralises formula text and is in the security log", async () => {
    const manager = await signIn(DEMO.manager);
    const order = await makeOrder(manager, { due: new Date(Date.now() + 3_600_000) });
    await makePart(admin, db, { order_id: order.id, material: "316L", size: [40, 30, 20] });
    await db.updateTable("orders").set({ customer: `=HYPERLINK("http://evil.example","x")` }).where("id", "=", order.id).execute();
    const today = new Date().toISOString().slice(0, 10);
    const res = await api(`/api/capacity/export?from=${today}&to=${today}&table=orders`, { cookie: admin });
    expect(res.status).toBe(200);
    const line = String(res.body).split("\r\n").find((l) => l.startsWith(order.code));
    expect(line, String(res.body).slice(0, 400)).toBeDefined();
    expect(line).toContain(`"'=HYPERLINK(""http://evil.example"",""x"")"`);
    const log = await fetch(`${appUrl()}/setup/security?kind=export`, { headers: { cookie: admin } });
    expect(log.status).toBe(200);
    expect(await log.text()).toContain("capacity orders");
  });
});
