// API tokens against the running app: created by an admin, shown once, stored hashed; Bearer
// works on every route with the same checks as a session narrowed by the token's scopes; a
// revoked or expired token gets 401; each token has its own rate limit (429 with Retry-After).
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { insertApiToken } from "@/db/api-tokens/commands";
import { API_SCOPE_NAMES, actorCan, hashApiToken, type ApiScope } from "@/lib/auth/api-scopes";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { ROUTE_PERMISSIONS, type HttpMethod, type RouteCheck } from "../auth/route-permissions";

const { db, close } = testDb();
let admin: string;
const stamp = Date.now().toString(36);

async function createToken(body: Record<string, unknown>): Promise<{ id: string; token: string }> {
  const res = await api("/api/api-tokens", { method: "POST", cookie: admin, body });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.token;
}

const bearer = (token: string, extra: Record<string, string> = {}) => ({ authorization: `Bearer ${token}`, ...extra });

const order = () => ({ code: `TOK-${stamp}-${randomUUID().slice(0, 8)}`, customer: "Token test customer", due_at: new Date(Date.now() + 14 * 86_400_000).toISOString() });

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
});
afterAll(async () => {
  await close();
});

describe("creating and listing tokens", () => {
  it("shows the token once and keeps only its sha-256", async () => {
    const t = await createToken({ name: `ERP ${stamp}`, scopes: ["shop:read"], expires_in_days: 30 });
    expect(t.token).toMatch(/^hth_[A-Za-z0-9_-]{43}$/);
    const row = await db.selectFrom("api_tokens").selectAll().where("id", "=", t.id).executeTakeFirstOrThrow();
    expect(row.token_hash).toBe(hashApiToken(t.token));
    expect(JSON.stringify(row)).not.toContain(t.token);
    const list = await api("/api/api-tokens", { cookie: admin });
    const listed = list.body.tokens.find((x: { id: string }) => x.id === t.id);
    expect(listed).toMatchObject({ name: `ERP ${stamp}`, scopes: ["shop:read"], status: "active", token_hint: t.token.slice(0, 8) + "…" });
    expect(JSON.stringify(list.body)).not.toContain(t.token);
    expect(JSON.stringify(list.body)).not.toContain(row.token_hash);
  });

  it("refuses bad input with field and reason", async () => {
    const res = await api("/api/api-tokens", { method: "POST", cookie: admin, body: { name: "", scopes: ["users:admin"], rate_limit_per_minute: 0 } });
    expect(res.status).toBe(422);
    expect(Object.keys(res.body.error.fieldErrors)).toEqual(expect.arrayContaining(["name", "scopes.0", "rate_limit_per_minute"]));
    expect((await api("/api/api-tokens", { method: "POST", cookie: admin, body: "{nope", headers: { "content-type": "application/json" } })).status).toBe(400);
    expect((await api("/api/api-tokens", { method: "POST", cookie: admin, body: "{nope" })).status).toBe(415);
    expect((await api(`/api/api-tokens/${randomUUID()}`, { method: "DELETE", cookie: admin })).status).toBe(404);
  });

  it("records when and from where a token was last used", async () => {
    const t = await createToken({ name: `Last use ${stamp}`, scopes: ["shop:read"] });
    expect((await api("/api/orders", { headers: bearer(t.token, { "x-forwarded-for": "192.0.2.77" }) })).status).toBe(200);
    const listed = (await api("/api/api-tokens", { cookie: admin })).body.tokens.find((x: { id: string }) => x.id === t.id);
    expect(listed.last_used_from).toBe("192.0.2.77");
    expect(Date.now() - Date.parse(listed.last_used_at)).toBeLessThan(60_000);
  });
});

describe("a token acts with its scopes", () => {
  it("a read token reads but cannot write (403); a write token writes", async () => {
    const read = await createToken({ name: `Read ${stamp}`, scopes: ["shop:read"] });
    const write = await createToken({ name: `Write ${stamp}`, scopes: ["shop:read", "orders:write"] });
    expect((await api("/api/orders", { headers: bearer(read.token) })).status).toBe(200);
    const refused = await api("/api/orders", { method: "POST", headers: bearer(read.token), body: order() });
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toContain("orders:write");
    const made = await api("/api/orders", { method: "POST", headers: bearer(write.token), body: order() });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
  });

  it("the bearer header wins over a session cookie sent with it", async () => {
    const read = await createToken({ name: `Read+cookie ${stamp}`, scopes: ["shop:read"] });
    const res = await api("/api/orders", { method: "POST", cookie: admin, headers: bearer(read.token), body: order() });
    expect(res.status).toBe(403);
  });

  it("reads the floor's window (the web server's cookie-only fast path leaves it to the route)", async () => {
    const read = await createToken({ name: `Floor ${stamp}`, scopes: ["shop:read"] });
    const from = new Date(Date.now() - 86_400_000).toISOString();
    const to = new Date(Date.now() + 6 * 86_400_000).toISOString();
    const q = `/api/floor?from=${encodeURIComponent(from)}&to=${encodeURIComponent(to)}`;
    const res = await api(q, { headers: bearer(read.token) });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const cookieOnly = await api(q, { cookie: admin });
    expect(Object.keys(res.body).sort()).toEqual(Object.keys(cookieOnly.body).sort());
    expect((await api(q, { headers: bearer("hth_" + "x".repeat(43)) })).status).toBe(401);
  });

  it("is not refused as cross-site: a token is no ambient credential", async () => {
    const write = await createToken({ name: `Cross ${stamp}`, scopes: ["shop:read", "orders:write"] });
    const foreign = { origin: "https://other-program.example", "sec-fetch-site": "cross-site" };
    const made = await api("/api/orders", { method: "POST", headers: bearer(write.token, foreign), body: order() });
    expect(made.status, JSON.stringify(made.body)).toBe(201);
    // the same request with the cookie alone is refused at the door
    expect((await api("/api/orders", { method: "POST", cookie: admin, headers: foreign, body: order() })).status).toBe(403);
  });

  it("cannot manage tokens or people, whatever its scopes", async () => {
    const all = await createToken({ name: `All ${stamp}`, scopes: API_SCOPE_NAMES });
    expect((await api("/api/api-tokens", { headers: bearer(all.token) })).status).toBe(403);
    expect((await api("/api/api-tokens", { method: "POST", headers: bearer(all.token), body: { name: "x", scopes: ["shop:read"] } })).status).toBe(403);
    expect((await api("/api/users", { headers: bearer(all.token) })).status).toBe(403);
    expect((await api("/api/me/password", { method: "POST", headers: bearer(all.token), body: {} })).status).toBe(403);
  });

  it("never does more than its creator's role allows", async () => {
    const tech = await db
      .insertInto("users")
      .values({ email: `tok-tech-${stamp}@test.hearth.test`, name: "Token technician", role: "technician" })
      .returning("id")
      .executeTakeFirstOrThrow();
    const made = await insertApiToken(db, tech.id, { name: `Tech ${stamp}`, scopes: ["shop:read", "setup:write", "orders:write"], rate_limit_per_minute: 600 });
    // setup:write is in the scopes but a technician may not change settings
    expect((await api("/api/shop-settings", { method: "PUT", headers: bearer(made.token), body: {} })).status).toBe(403);
    expect((await api("/api/orders", { method: "POST", headers: bearer(made.token), body: order() })).status).toBe(201);
    // deactivating the creator ends the token
    await db.updateTable("users").set({ active: false }).where("id", "=", tech.id).execute();
    expect((await api("/api/orders", { headers: bearer(made.token) })).status).toBe(401);
  });
});

describe("a token that is not valid gets 401", () => {
  it("revoked, expired, unknown, malformed or empty", async () => {
    const t = await createToken({ name: `Revoke ${stamp}`, scopes: ["shop:read"] });
    expect((await api("/api/orders", { headers: bearer(t.token) })).status).toBe(200);
    expect((await api(`/api/api-tokens/${t.id}`, { method: "DELETE", cookie: admin })).status).toBe(200);
    expect((await api("/api/orders", { headers: bearer(t.token) })).status).toBe(401);
    const listed = (await api("/api/api-tokens", { cookie: admin })).body.tokens.find((x: { id: string }) => x.id === t.id);
    expect(listed.status).toBe("revoked");

    const e = await createToken({ name: `Expire ${stamp}`, scopes: ["shop:read"], expires_in_days: 1 });
    expect((await api("/api/orders", { headers: bearer(e.token) })).status).toBe(200);
    await db.updateTable("api_tokens").set({ expires_at: new Date(Date.now() - 1000) }).where("id", "=", e.id).execute();
    expect((await api("/api/orders", { headers: bearer(e.token) })).status).toBe(401);

    const unknown = `hth_${"A".repeat(43)}`;
    for (const h of [`Bearer ${unknown}`, "Bearer not-a-token", "Bearer", "bearer  "]) {
      const res = await api("/api/orders", { headers: { authorization: h }, cookie: admin });
      expect(res.status, h).toBe(401);
    }
  });
});

describe("each token has its own rate limit", () => {
  it("answers 429 with Retry-After once the minute's requests are used, and other tokens go on", async () => {
    const t = await createToken({ name: `Limit ${stamp}`, scopes: ["shop:read"], rate_limit_per_minute: 3 });
    const other = await createToken({ name: `Other ${stamp}`, scopes: ["shop:read"], rate_limit_per_minute: 3 });
    for (let i = 0; i < 3; i++) expect((await api("/api/orders?page_size=1", { headers: bearer(t.token) })).status).toBe(200);
    const limited = await api("/api/orders?page_size=1", { headers: bearer(t.token) });
    expect(limited.status).toBe(429);
    const wait = Number(limited.headers.get("retry-after"));
    expect(wait).toBeGreaterThanOrEqual(1);
    expect(wait).toBeLessThanOrEqual(60);
    expect(limited.body.error.code).toBe("too_many_requests");
    expect((await api("/api/orders?page_size=1", { headers: bearer(other.token) })).status).toBe(200);
    // a new window starts once the old one is over
    await db.updateTable("api_tokens").set({ window_started_at: new Date(Date.now() - 61_000) }).where("id", "=", t.id).execute();
    expect((await api("/api/orders?page_size=1", { headers: bearer(t.token) })).status).toBe(200);
  });
});

describe("scopes × routes: every gated route, one token per scope", () => {
  const tokens = new Map<ApiScope, string>();
  beforeAll(async () => {
    for (const scope of API_SCOPE_NAMES) tokens.set(scope, (await createToken({ name: `Scope ${scope} ${stamp}`, scopes: [scope], rate_limit_per_minute: 100000 })).token);
  });

  const fill = (pattern: string) => pattern.replace(/\[\.\.\.[^\]]+\]|\[[^\]]+\]/g, () => randomUUID());

  for (const [pattern, methods] of Object.entries(ROUTE_PERMISSIONS)) {
    for (const [method, check] of Object.entries(methods) as [HttpMethod, RouteCheck][]) {
      const gate = typeof check === "string" ? check : check.gate;
      if (gate === "public" || gate === "signed_in") continue;
      it(`${method} ${pattern} – ${gate}`, async () => {
        const url = typeof check === "object" && check.path ? check.path : fill(pattern);
        const body = typeof check === "object" ? check.body : undefined;
        const wrong: string[] = [];
        for (const scope of API_SCOPE_NAMES) {
          const headers: Record<string, string> = bearer(tokens.get(scope)!);
          let payload: string | undefined;
          if (method !== "GET" && method !== "HEAD" && method !== "DELETE" && body !== null) {
            payload = typeof body === "object" && body ? JSON.stringify(body) : (body ?? "{not json");
            headers["content-type"] = "application/json";
          }
          const res = await fetch(`${appUrl()}${url}`, { method, headers, body: payload, redirect: "manual" });
          // a stream (server-sent events) stays open once allowed: judge its status, then hang up
          const stream = typeof check === "object" && check.stream === true && res.ok;
          if (stream) await res.body?.cancel();
          const text = stream ? "(stream)" : (await res.text()).slice(0, 160);
          const through = actorCan({ role: "admin", token_scopes: [scope] }, gate);
          const ok = through ? res.status !== 401 && res.status !== 403 && res.status < 500 : res.status === 403;
          if (!ok) wrong.push(`${scope}: wanted ${through ? "through" : "403"}, got ${res.status} ${text}`);
        }
        expect(wrong, `${method} ${url}\n  ${wrong.join("\n  ")}`).toEqual([]);
      });
    }
  }
});
