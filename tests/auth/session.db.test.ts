// Sessions, abuse limits and account links against the running app and the test database.
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sealData } from "iron-session";
import { sql } from "kysely";
import { hashPassword } from "@/lib/auth/password";
import { SESSION_IDLE_SECONDS, SESSION_MAX_SECONDS, SESSION_RENEW_SECONDS } from "@/lib/auth/session-config";
import { hashToken } from "@/lib/auth/tokens";
import type { Role } from "@/lib/auth/permissions";
import { appUrl } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";

const BAD_CREDENTIALS = "That e-mail address and password do not match an active account.";
const { db, close } = testDb();
const stamp = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`;
let seq = 0;
const uniqueEmail = (tag: string) => `s-${tag}-${stamp}-${++seq}@test.hearth.test`;
const uniqueIp = () => `10.${50 + Math.floor(Math.random() * 200)}.${Math.floor(Math.random() * 250)}.${++seq % 250}`;

// One password for the throwaway users, hashed once: argon2id at 64 MiB is slow on purpose.
const SHARED_PASSWORD = `pw-${randomUUID()}`;
let sharedHash: Promise<string> | undefined;

async function makeUser(role: Role = "technician") {
  const email = uniqueEmail(role);
  const password = SHARED_PASSWORD;
  const row = await db
    .insertInto("users")
    .values({ email, name: `Session test ${role}`, role, password_hash: await (sharedHash ??= hashPassword(SHARED_PASSWORD)) })
    .returning(["id", "version"])
    .executeTakeFirstOrThrow();
  return { id: row.id, email, password };
}

async function signInRaw(email: string, password: string, ip = uniqueIp(), extra: Record<string, string> = {}) {
  const res = await fetch(`${appUrl()}/api/session`, {
    method: "POST",
    headers: { "content-type": "application/json", "x-forwarded-for": ip, ...extra },
    body: JSON.stringify({ email, password }),
  });
  const body = await res.json();
  const setCookie = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="));
  return { status: res.status, body, setCookie, cookie: setCookie?.split(";")[0], retryAfter: res.headers.get("retry-after") };
}

/** A user_sessions row for a hand-sealed cookie (as sign-in makes one); none for a user that does not exist. */
async function openSessionRow(userId: unknown): Promise<string | undefined> {
  if (typeof userId !== "string" || !/^[0-9a-f-]{36}$/i.test(userId)) return undefined;
  const { rows } = await sql<{ id: string }>`insert into user_sessions (user_id) select id from users where id = ${userId} returning id`.execute(db);
  return rows[0]?.id;
}

async function seal(data: Record<string, unknown>) {
  const secret = process.env.SESSION_SECRET;
  if (!secret) throw new Error("SESSION_SECRET is not in the test environment");
  if (!("sid" in data)) data = { ...data, sid: await openSessionRow(data.userId) };
  return `hearth_session=${await sealData(data, { password: secret, ttl: SESSION_IDLE_SECONDS })}`;
}

/** Reads the capture server until a message for `to` (newer than `after`) arrives. */
async function waitForMail(to: string, after = 0, timeoutMs = 15_000) {
  const base = process.env.MAIL_CAPTURE_URL;
  if (!base) throw new Error("MAIL_CAPTURE_URL is not set");
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const res = await fetch(`${base}/messages?to=${encodeURIComponent(to)}`);
    const { messages } = (await res.json()) as { messages: { subject: string; text: string; html: string; received_at: string; to: string[] }[] };
    const fresh = messages.filter((m) => new Date(m.received_at).getTime() > after);
    if (fresh.length) return fresh[0];
    await new Promise((r) => setTimeout(r, 200));
  }
  throw new Error(`no mail for ${to} within ${timeoutMs} ms`);
}

const tokenFrom = (text: string) => {
  const m = /set-password\?token=([A-Za-z0-9_-]{43})/.exec(text);
  if (!m) throw new Error(`no set-password link in: ${text.slice(0, 300)}`);
  return m[1];
};

let adminCookie = "";
beforeAll(async () => {
  adminCookie = await signIn(DEMO.admin);
});
afterAll(async () => {
  await db.updateTable("users").set({ active: false }).where("email", "like", `s-%-${stamp}-%`).execute();
  await close();
});

describe("the session cookie", () => {
  it("is HttpOnly, SameSite=Lax, path /, bounded to the idle lifetime and not Secure over http", async () => {
    const u = await makeUser();
    const r = await signInRaw(u.email, u.password);
    expect(r.status).toBe(200);
    const flags = r.setCookie!.split(";").map((s) => s.trim().toLowerCase());
    expect(flags).toContain("httponly");
    expect(flags).toContain("samesite=lax");
    expect(flags).toContain("path=/");
    expect(flags).not.toContain("secure");
    const maxAge = Number(flags.find((f) => f.startsWith("max-age="))!.split("=")[1]);
    expect(maxAge).toBeGreaterThan(SESSION_IDLE_SECONDS - 120);
    expect(maxAge).toBeLessThanOrEqual(SESSION_IDLE_SECONDS);
  });

  it("is Secure when the request came over https (X-Forwarded-Proto)", async () => {
    const u = await makeUser();
    const r = await signInRaw(u.email, u.password, uniqueIp(), { "x-forwarded-proto": "https" });
    expect(r.status).toBe(200);
    expect(r.setCookie!.toLowerCase().split(";").map((s) => s.trim())).toContain("secure");
  });

  it("holds nothing readable: the user id is sealed", async () => {
    const u = await makeUser();
    const r = await signInRaw(u.email, u.password);
    expect(r.cookie).not.toContain(u.id);
    expect(r.cookie!.startsWith("hearth_session=Fe26.2*")).toBe(true);
  });

  it("tampered, foreign or garbage cookies mean signed out: 401 from the API, sign-in for pages, never a 500", async () => {
    const u = await makeUser();
    const { cookie } = await signInRaw(u.email, u.password);
    expect((await api("/api/session", { cookie })).status).toBe(200);
    const value = cookie!.slice("hearth_session=".length);
    const i = Math.floor(value.length / 2);
    const flipped = `hearth_session=${value.slice(0, i)}${value[i] === "A" ? "B" : "A"}${value.slice(i + 1)}`;
    const foreign = `hearth_session=${await sealData({ userId: u.id, issuedAt: Date.now(), seenAt: Date.now() }, { password: "another-secret-another-secret-another-secret" })}`;
    for (const bad of [flipped, foreign, "hearth_session=garbage", "hearth_session=Fe26.2**x*y*z", `hearth_session=${"A".repeat(5000)}`]) {
      const a = await api("/api/me", { cookie: bad });
      expect(a.status, bad.slice(0, 40)).toBe(401);
      const page = await api("/floor", { cookie: bad });
      expect([307, 308, 303], `page with ${bad.slice(0, 40)}`).toContain(page.status);
      expect(page.headers.get("location")).toMatch(/\/sign-in\?next=%2Ffloor/);
    }
  });

  it("a crafted cookie with the real secret works while fresh (so the expiry checks below can fail)", async () => {
    const u = await makeUser("manager");
    const now = Date.now();
    const res = await api("/api/me", { cookie: await seal({ userId: u.id, issuedAt: now, seenAt: now }) });
    expect(res.status).toBe(200);
    expect(res.body.user.email).toBe(u.email);
  });

  it("ends after the idle lifetime without activity", async () => {
    const u = await makeUser();
    const then = Date.now() - (SESSION_IDLE_SECONDS + 60) * 1000;
    expect((await api("/api/me", { cookie: await seal({ userId: u.id, issuedAt: then, seenAt: then }) })).status).toBe(401);
  });

  it("ends after the absolute lifetime however active", async () => {
    const u = await makeUser();
    const now = Date.now();
    const cookie = await seal({ userId: u.id, issuedAt: now - (SESSION_MAX_SECONDS + 60) * 1000, seenAt: now - 1000 });
    expect((await api("/api/me", { cookie })).status).toBe(401);
    const page = await api("/floor", { cookie });
    expect(page.headers.get("location")).toMatch(/\/sign-in/);
  });

  it("slides: a request after the renewal interval gets a fresh cookie; a recent one does not", async () => {
    const u = await makeUser();
    const now = Date.now();
    const old = await api("/api/me", { cookie: await seal({ userId: u.id, issuedAt: now - 3600_000, seenAt: now - (SESSION_RENEW_SECONDS + 30) * 1000 }) });
    expect(old.status).toBe(200);
    expect(old.headers.getSetCookie().some((c) => c.startsWith("hearth_session=Fe26"))).toBe(true);
    const recent = await api("/api/me", { cookie: await seal({ userId: u.id, issuedAt: now - 1000, seenAt: now - 1000 }) });
    expect(recent.status).toBe(200);
    expect(recent.headers.getSetCookie().some((c) => c.startsWith("hearth_session="))).toBe(false);
  });

  it("sessions issued before sessions_valid_after are refused", async () => {
    const u = await makeUser();
    const { cookie } = await signInRaw(u.email, u.password);
    expect((await api("/api/me", { cookie })).status).toBe(200);
    await db.updateTable("users").set({ sessions_valid_after: sql`now()` }).where("id", "=", u.id).execute();
    expect((await api("/api/me", { cookie })).status).toBe(401);
  });

  it("sign-out clears the cookie and writes the audit event", async () => {
    const u = await makeUser();
    const { cookie } = await signInRaw(u.email, u.password);
    const res = await api("/api/session", { method: "DELETE", cookie });
    expect(res.status).toBe(200);
    const cleared = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))!;
    expect(cleared).toMatch(/hearth_session=;|max-age=0|expires=thu, 01 jan 1970/i);
    const kinds = await db.selectFrom("events").select("kind").where("entity", "=", "user").where("entity_id", "=", u.id).execute();
    expect(kinds.map((k) => k.kind)).toEqual(expect.arrayContaining(["sign_in", "sign_out"]));
    // sign-out with a damaged cookie still answers 200
    expect((await api("/api/session", { method: "DELETE", cookie: "hearth_session=garbage" })).status).toBe(200);
  });
});

describe("roles and deactivation take effect at once", () => {
  it("a deactivated user's cookie stops working on the next request, and stays dead after reactivation", async () => {
    const u = await makeUser("furnace_operator");
    const { cookie } = await signInRaw(u.email, u.password);
    expect((await api("/api/me", { cookie })).status).toBe(200);
    const before = await api(`/api/users/${u.id}`, { cookie: adminCookie });
    const off = await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: before.body.user.version, active: false } });
    expect(off.status, JSON.stringify(off.body)).toBe(200);
    expect(off.body.user.active).toBe(false);
    expect((await api("/api/me", { cookie })).status).toBe(401);
    expect((await api("/batches", { cookie })).headers.get("location")).toMatch(/\/sign-in/);
    // the right password on a deactivated account reads exactly like a wrong one
    const again = await signInRaw(u.email, u.password);
    expect(again.status).toBe(401);
    expect(again.body.error.message).toBe(BAD_CREDENTIALS);
    const on = await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: off.body.user.version, active: true } });
    expect(on.status).toBe(200);
    expect((await api("/api/me", { cookie })).status).toBe(401);
    expect((await signInRaw(u.email, u.password)).status).toBe(200);
    const kinds = (await db.selectFrom("events").select("kind").where("entity_id", "=", u.id).execute()).map((e) => e.kind);
    expect(kinds).toEqual(expect.arrayContaining(["deactivated", "reactivated"]));
  });

  it("a role change applies to the open session, with an audit event", async () => {
    const u = await makeUser("technician");
    const { cookie } = await signInRaw(u.email, u.password);
    expect((await api("/api/capacity", { cookie })).status).toBe(403);
    const v = (await api(`/api/users/${u.id}`, { cookie: adminCookie })).body.user.version;
    const res = await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: v, role: "manager" } });
    expect(res.status).toBe(200);
    expect((await api("/api/capacity", { cookie })).status).not.toBe(403);
    const ev = await db.selectFrom("events").select(["from_state", "to_state", "actor_id"]).where("entity_id", "=", u.id).where("kind", "=", "role_change").executeTakeFirstOrThrow();
    expect(ev).toMatchObject({ from_state: "technician", to_state: "manager" });
    expect(ev.actor_id).not.toBeNull();
  });

  it("a stale version is a 409 and changes nothing; an admin cannot deactivate themselves", async () => {
    const u = await makeUser("machinist");
    const v = (await api(`/api/users/${u.id}`, { cookie: adminCookie })).body.user.version;
    expect((await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: v, name: "Renamed once" } })).status).toBe(200);
    const stale = await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: v, role: "admin" } });
    expect(stale.status).toBe(409);
    expect((await api(`/api/users/${u.id}`, { cookie: adminCookie })).body.user.role).toBe("machinist");
    const me = (await api("/api/session", { cookie: adminCookie })).body.user;
    const mine = (await api(`/api/users/${me.id}`, { cookie: adminCookie })).body.user;
    const self = await api(`/api/users/${me.id}`, { method: "PATCH", cookie: adminCookie, body: { version: mine.version, active: false } });
    expect(self.status).toBe(422);
    expect(self.body.error.fieldErrors.active).toBeDefined();
  });

  it("bad input is a 400 or 422 with field errors, never a 500", async () => {
    expect((await api("/api/users", { method: "POST", cookie: adminCookie, body: "{nope", headers: { "content-type": "application/json" } })).status).toBe(400);
    const bad = await api("/api/users", { method: "POST", cookie: adminCookie, body: { email: "not-an-address", name: "", role: "owner" } });
    expect(bad.status).toBe(422);
    expect(Object.keys(bad.body.error.fieldErrors).sort()).toEqual(["email", "name", "role"]);
    expect((await api(`/api/users/not-a-uuid`, { cookie: adminCookie })).status).toBe(404);
    const dup = await api("/api/users", { method: "POST", cookie: adminCookie, body: { email: DEMO.manager.toUpperCase(), name: "Twin", role: "manager" } });
    expect(dup.status).toBe(409);
    expect(dup.body.error.fieldErrors.email).toBeDefined();
  });
});

describe("sign-in throttling", () => {
  it("says the same for an unknown address and a wrong password", async () => {
    const u = await makeUser();
    const wrong = await signInRaw(u.email, "not-the-password");
    const unknown = await signInRaw(uniqueEmail("nobody"), "not-the-password");
    expect(wrong.status).toBe(401);
    expect(unknown.status).toBe(401);
    // the same answer but for the request id every error carries
    const answer = (b: { error: Record<string, unknown> }) => ({ ...b, error: { ...b.error, request_id: undefined } });
    expect(answer(wrong.body)).toEqual(answer(unknown.body));
    expect(wrong.body.error.request_id).not.toEqual(unknown.body.error.request_id);
    expect(wrong.body.error.message).toBe(BAD_CREDENTIALS);
  });

  it("per account: after 5 failures the 6th attempt – even with the right password, from another address – gets 429 and the wait", async () => {
    const u = await makeUser();
    for (let i = 0; i < 5; i++) {
      const r = await signInRaw(u.email, `wrong-${i}`, uniqueIp());
      expect(r.status, `attempt ${i + 1}`).toBe(401);
    }
    const sixth = await signInRaw(u.email, u.password, uniqueIp());
    expect(sixth.status).toBe(429);
    expect(sixth.body.error.message).toMatch(/^Too many failed sign-ins for this account\. Wait (1[0-5]|[1-9]) minutes? and try again\.$/);
    expect(Number(sixth.retryAfter)).toBeGreaterThan(14 * 60);
    expect(Number(sixth.retryAfter)).toBeLessThanOrEqual(15 * 60);
    expect(sixth.cookie).toBeUndefined();
    const failed = await db.selectFrom("events").select(["reason"]).where("entity_id", "=", u.id).where("kind", "=", "sign_in_failed").execute();
    expect(failed.map((f) => f.reason).sort()).toEqual(["throttled", ...Array(5).fill("wrong_password")].sort());
  });

  it("the wait shortens as old failures age out of the 15-minute window", async () => {
    const u = await makeUser();
    for (let i = 0; i < 5; i++) await signInRaw(u.email, "wrong", uniqueIp());
    // age the failures: the oldest counting one now left the window 4 minutes from now
    await db.updateTable("sign_in_attempts").set({ created_at: sql`now() - interval '11 minutes'` }).where(sql<boolean>`lower(email) = ${u.email}`).execute();
    const r = await signInRaw(u.email, u.password, uniqueIp());
    expect(r.status).toBe(429);
    expect(r.body.error.message).toContain("Wait 4 minutes");
    await db.updateTable("sign_in_attempts").set({ created_at: sql`now() - interval '16 minutes'` }).where(sql<boolean>`lower(email) = ${u.email}`).execute();
    expect((await signInRaw(u.email, u.password, uniqueIp())).status).toBe(200);
  });

  it("a success clears the account's count", async () => {
    const u = await makeUser();
    for (let i = 0; i < 4; i++) expect((await signInRaw(u.email, "wrong", uniqueIp())).status).toBe(401);
    expect((await signInRaw(u.email, u.password, uniqueIp())).status).toBe(200);
    for (let i = 0; i < 4; i++) expect((await signInRaw(u.email, "wrong", uniqueIp())).status).toBe(401);
    expect((await signInRaw(u.email, u.password, uniqueIp())).status).toBe(200);
  });

  it("per address: 5 failures on different accounts from one address block the 6th from it, for any account", async () => {
    const ip = uniqueIp();
    for (let i = 0; i < 5; i++) expect((await signInRaw(uniqueEmail("spray"), "guess", ip)).status).toBe(401);
    const u = await makeUser();
    const blocked = await signInRaw(u.email, u.password, ip);
    expect(blocked.status).toBe(429);
    expect(blocked.body.error.message).toMatch(/from this address\. Wait \d+ minutes? and try again\./);
    expect((await signInRaw(u.email, u.password, uniqueIp())).status).toBe(200);
  });

  it("parallel guesses cannot slip past the limit", async () => {
    const u = await makeUser();
    const results = await Promise.all(Array.from({ length: 12 }, (_, i) => signInRaw(u.email, `parallel-${i}`, uniqueIp())));
    const verified = results.filter((r) => r.status === 401).length;
    expect(verified).toBeLessThanOrEqual(6);
    expect(results.filter((r) => r.status === 429).length).toBeGreaterThanOrEqual(6);
  });
});

describe("invitations and reset links", () => {
  it("an invitation reaches the mail server with a single-use link; only its sha-256 is stored", async () => {
    const email = uniqueEmail("invitee");
    const before = Date.now() - 1000;
    const res = await api("/api/users", { method: "POST", cookie: adminCookie, body: { email, name: "Invited Person", role: "machinist", unit_pref: "in" } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.mail.status).toBe("sent");
    expect(res.body.user).toMatchObject({ email, role: "machinist", has_password: false, active: true });
    const mail = await waitForMail(email, before);
    expect(mail.subject).toMatch(/You have a Hearth account/);
    expect(mail.text).toContain("48 hours");
    const token = tokenFrom(mail.text);
    const stored = await db.selectFrom("auth_tokens").selectAll().where("user_id", "=", res.body.user.id).execute();
    expect(stored).toHaveLength(1);
    expect(stored[0].token_hash).toBe(hashToken(token));
    expect(JSON.stringify(stored)).not.toContain(token);
    const expiresIn = new Date(stored[0].expires_at).getTime() - Date.now();
    expect(expiresIn).toBeGreaterThan(47.9 * 3600_000);
    expect(expiresIn).toBeLessThanOrEqual(48 * 3600_000);
    const outbox = await db.selectFrom("notification_outbox").selectAll().where("recipient_email", "=", email).executeTakeFirstOrThrow();
    expect(outbox).toMatchObject({ kind: "invite", subject_key: stored[0].id, status: "sent", attempts: 1 });
    expect(outbox.sent_at).not.toBeNull();
    // the invited person cannot sign in yet, and is told what any other failure is told
    expect((await signInRaw(email, "anything-at-all")).body.error.message).toBe(BAD_CREDENTIALS);

    const page = await fetch(`${appUrl()}/set-password?token=${token}`);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain("Welcome, Invited Person");

    const newPassword = `chosen-${randomUUID()}`;
    const set = await api("/api/session/password", { method: "POST", body: { token, password: newPassword, confirm: newPassword } });
    expect(set.status, JSON.stringify(set.body)).toBe(200);
    expect((await signInRaw(email, newPassword)).status).toBe(200);

    const reuse = await api("/api/session/password", { method: "POST", body: { token, password: "another-password-1", confirm: "another-password-1" } });
    expect(reuse.status).toBe(409);
    expect(reuse.body.error.message).toMatch(/used already/);
    expect((await signInRaw(email, newPassword)).status).toBe(200);
    const usedPage = await (await fetch(`${appUrl()}/set-password?token=${token}`)).text();
    expect(usedPage).toContain("This link has been used already.");
    const kinds = (await db.selectFrom("events").select("kind").where("entity_id", "=", res.body.user.id).execute()).map((e) => e.kind);
    expect(kinds).toEqual(expect.arrayContaining(["invited", "password_set", "sign_in"]));
  });

  it("forgot-password answers the same for any address and mails a 1-hour link that ends the old sessions", async () => {
    const u = await makeUser("manager");
    const { cookie } = await signInRaw(u.email, u.password);
    const before = Date.now() - 1000;
    const known = await api("/api/session/reset-requests", { method: "POST", body: { email: u.email }, headers: { "x-forwarded-for": uniqueIp() } });
    const unknown = await api("/api/session/reset-requests", { method: "POST", body: { email: uniqueEmail("ghost") }, headers: { "x-forwarded-for": uniqueIp() } });
    expect(known.status).toBe(202);
    expect(unknown.status).toBe(202);
    expect(known.body).toEqual(unknown.body);
    const mail = await waitForMail(u.email, before);
    expect(mail.text).toContain("1 hour");
    const token = tokenFrom(mail.text);
    const row = await db.selectFrom("auth_tokens").select(["expires_at", "kind"]).where("token_hash", "=", hashToken(token)).executeTakeFirstOrThrow();
    expect(row.kind).toBe("reset");
    expect(new Date(row.expires_at).getTime() - Date.now()).toBeLessThanOrEqual(3600_000);
    const fresh = `reset-${randomUUID()}`;
    expect((await api("/api/session/password", { method: "POST", body: { token, password: fresh, confirm: fresh } })).status).toBe(200);
    expect((await api("/api/me", { cookie })).status).toBe(401);
    expect((await signInRaw(u.email, u.password)).status).toBe(401);
    expect((await signInRaw(u.email, fresh)).status).toBe(200);
    const kinds = (await db.selectFrom("events").select("kind").where("entity_id", "=", u.id).execute()).map((e) => e.kind);
    expect(kinds).toEqual(expect.arrayContaining(["password_reset_requested", "password_reset"]));
  });

  it("an expired link is refused, leaves the password as it was, and the page says so", async () => {
    const u = await makeUser();
    const before = Date.now() - 1000;
    const sent = await api(`/api/users/${u.id}/link`, { method: "POST", cookie: adminCookie });
    expect(sent.status).toBe(201);
    expect(sent.body).toMatchObject({ kind: "reset", mail: { status: "sent" } });
    const token = tokenFrom((await waitForMail(u.email, before)).text);
    await db.updateTable("auth_tokens").set({ expires_at: sql`now() - interval '1 second'` }).where("token_hash", "=", hashToken(token)).execute();
    const res = await api("/api/session/password", { method: "POST", body: { token, password: "too-late-password", confirm: "too-late-password" } });
    expect(res.status).toBe(422);
    expect(res.body.error.message).toMatch(/expired/);
    expect((await signInRaw(u.email, u.password)).status).toBe(200);
    expect(await (await fetch(`${appUrl()}/set-password?token=${token}`)).text()).toContain("This link has expired.");
  });

  it("a newer link makes the older one useless; a made-up token is refused", async () => {
    const u = await makeUser();
    const t0 = Date.now() - 1000;
    await api(`/api/users/${u.id}/link`, { method: "POST", cookie: adminCookie });
    const first = tokenFrom((await waitForMail(u.email, t0)).text);
    await new Promise((r) => setTimeout(r, 20));
    const t1 = Date.now();
    await api(`/api/users/${u.id}/link`, { method: "POST", cookie: adminCookie });
    const second = tokenFrom((await waitForMail(u.email, t1)).text);
    expect(second).not.toBe(first);
    expect((await api("/api/session/password", { method: "POST", body: { token: first, password: "first-link-password", confirm: "first-link-password" } })).status).toBe(409);
    expect((await api("/api/session/password", { method: "POST", body: { token: "x".repeat(43), password: "made-up-password", confirm: "made-up-password" } })).status).toBe(422);
    expect((await api("/api/session/password", { method: "POST", body: { token: second, password: "second-link-pass", confirm: "second-link-pass" } })).status).toBe(200);
  });

  it("a deactivated account's link does not work", async () => {
    const u = await makeUser();
    const t0 = Date.now() - 1000;
    await api(`/api/users/${u.id}/link`, { method: "POST", cookie: adminCookie });
    const token = tokenFrom((await waitForMail(u.email, t0)).text);
    const v = (await api(`/api/users/${u.id}`, { cookie: adminCookie })).body.user.version;
    await api(`/api/users/${u.id}`, { method: "PATCH", cookie: adminCookie, body: { version: v, active: false } });
    const res = await api("/api/session/password", { method: "POST", body: { token, password: "deactivated-pass", confirm: "deactivated-pass" } });
    expect([403, 409]).toContain(res.status);
    expect((await api(`/api/users/${u.id}/link`, { method: "POST", cookie: adminCookie })).status).toBe(409);
  });
});

describe("my own settings", () => {
  it("changing my password needs the current one and ends my other sessions, not this one", async () => {
    const u = await makeUser("machinist");
    const a = (await signInRaw(u.email, u.password)).cookie!;
    const b = (await signInRaw(u.email, u.password)).cookie!;
    const wrong = await api("/api/me/password", { method: "POST", cookie: a, body: { current_password: "nope-nope-nope", new_password: "brand-new-password", confirm: "brand-new-password" } });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.fieldErrors.current_password).toBeDefined();
    const ok = await fetch(`${appUrl()}/api/me/password`, {
      method: "POST",
      headers: { cookie: a, "content-type": "application/json" },
      body: JSON.stringify({ current_password: u.password, new_password: "brand-new-password", confirm: "brand-new-password" }),
    });
    expect(ok.status).toBe(200);
    const renewed = ok.headers.getSetCookie().find((c) => c.startsWith("hearth_session=Fe26"))!.split(";")[0];
    expect((await api("/api/me", { cookie: renewed })).status).toBe(200);
    expect((await api("/api/me", { cookie: b })).status).toBe(401);
    expect((await api("/api/me", { cookie: a })).status).toBe(401);
    expect((await signInRaw(u.email, "brand-new-password")).status).toBe(200);
  });

  it("name, units and muted e-mail kinds are saved; unknown kinds are refused", async () => {
    const u = await makeUser("furnace_operator");
    const { cookie } = await signInRaw(u.email, u.password);
    const res = await api("/api/me", { method: "PATCH", cookie, body: { name: "Renamed Operator", unit_pref: "in", muted_mail: ["wash_done", "furnace_run_finished", "wash_done"] } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.user).toMatchObject({ name: "Renamed Operator", unit_pref: "in", muted_mail: ["furnace_run_finished", "wash_done"] });
    const row = await db.selectFrom("users").select(["name", "unit_pref", "muted_mail"]).where("id", "=", u.id).executeTakeFirstOrThrow();
    expect(row).toEqual({ name: "Renamed Operator", unit_pref: "in", muted_mail: ["furnace_run_finished", "wash_done"] });
    expect((await api("/api/me", { method: "PATCH", cookie, body: { muted_mail: ["invite"] } })).status).toBe(422);
    expect((await api("/api/me", { method: "PATCH", cookie, body: { role: "admin" } })).status).toBe(422);
    expect((await db.selectFrom("users").select("role").where("id", "=", u.id).executeTakeFirstOrThrow()).role).toBe("furnace_operator");
  });

  it("sign out everywhere else keeps this session only", async () => {
    const u = await makeUser();
    const a = (await signInRaw(u.email, u.password)).cookie!;
    const b = (await signInRaw(u.email, u.password)).cookie!;
    const res = await fetch(`${appUrl()}/api/me/sessions`, { method: "DELETE", headers: { cookie: a } });
    expect(res.status).toBe(200);
    // each session has its own row: this one stays open with the same cookie, the other ends
    expect((await api("/api/me", { cookie: a })).status).toBe(200);
    expect((await api("/api/me", { cookie: b })).status).toBe(401);
  });
});

describe("pages of this area", () => {
  const pages = [
    { path: "/setup", admin: true },
    { path: "/setup/users", admin: true },
    { path: "/settings", admin: false },
  ];
  it("send a signed-out visitor to sign in and back, and a role without access to the 403 page", async () => {
    const tech = await signIn(DEMO.technician);
    for (const p of pages) {
      const out = await api(p.path);
      expect(out.status, p.path).toBe(307);
      expect(out.headers.get("location")).toBe(`/sign-in?next=${encodeURIComponent(p.path)}`);
      const asAdmin = await api(p.path, { cookie: adminCookie });
      expect(asAdmin.status, `${p.path} as admin`).toBe(200);
      const asTech = await api(p.path, { cookie: tech });
      if (p.admin) expect(asTech.headers.get("location"), `${p.path} as technician`).toMatch(/^\/forbidden/);
      else expect(asTech.status).toBe(200);
    }
  });
});
