import http from "node:http";
import type { AddressInfo } from "node:net";
import { gunzipSync } from "node:zlib";
import { randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { sealData } from "iron-session";
import { sql } from "kysely";
import { floorChangeStamp, floorViewerAndStamp, loadFloorJson } from "@/db/floor/reads";
import { ROLES, type Role } from "@/lib/auth/permissions";
import { SESSION_IDLE_SECONDS, SESSION_MAX_SECONDS, SESSION_RENEW_SECONDS } from "@/lib/auth/session-config";
import { answerFloorWindow } from "@/app/_server/shared-read-direct";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { hoursFromNow, makeDraftBuild, makePrinter, retirePrinters } from "./fixtures";
import { rawRequest } from "../helpers/raw-request";

// GET /api/floor answered by the web server itself (app/_server/shared-read-direct.ts), on the real test
// database: what it answers must be what the route handler would answer, and everything that is
// not the plain signed-in case must be left to the route handler. An in-process server with a
// fallback that only says "deferred" shows which requests the direct path takes; the running app
// (scripts/serve.ts in front of Next.js) shows that the two paths give the same answer.

const { db, close } = testDb();
const SECRET = process.env.SESSION_SECRET ?? "";
const DEFERRED = 599;
let server: http.Server;
let base = "";
let tech: string;
const printers: string[] = [];
const users: string[] = [];

async function makeUser(role: Role, opts: { active?: boolean } = {}) {
  const row = await db
    .insertInto("users")
    .values({ email: `direct-${role}-${randomUUID()}@test.hearth.test`, name: `Direct path ${role}`, role, active: opts.active ?? true })
    .returning("id")
    .executeTakeFirstOrThrow();
  users.push(row.id);
  return row.id;
}

/** A user_sessions row for a hand-sealed cookie (as sign-in makes one); none for a user that does not exist. */
async function openSessionRow(userId: unknown): Promise<string | undefined> {
  if (typeof userId !== "string" || !/^[0-9a-f-]{36}$/i.test(userId)) return undefined;
  const { rows } = await sql<{ id: string }>`insert into user_sessions (user_id) select id from users where id = ${userId} returning id`.execute(db);
  return rows[0]?.id;
}

async function cookieFor(data: Record<string, unknown>, secret = SECRET) {
  if (!("sid" in data)) data = { ...data, sid: await openSessionRow(data.userId) };
  return `hearth_session=${await sealData(data, { password: secret, ttl: SESSION_IDLE_SECONDS })}`;
}

const fresh = (userId: string, now = Date.now()) => cookieFor({ userId, issuedAt: now - 60_000, seenAt: now - 1_000 });

function windowPath(from: Date, to: Date) {
  return `/api/floor?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`;
}

const direct = (path: string, headers: Record<string, string> = {}, method = "GET") => rawRequest(base, path, headers, method);

/** The window as the database writes it, without the load time the body carries. */
const withoutStamp = (json: string) => {
  const { stamp: _stamp, ...rest } = JSON.parse(json) as Record<string, unknown>;
  return rest;
};

beforeAll(async () => {
  if (SECRET.length < 32) throw new Error("SESSION_SECRET is not in the test environment");
  server = http.createServer((req, res) => {
    answerFloorWindow(req, res, db, SECRET)
      .then((answered) => {
        if (!answered) res.writeHead(DEFERRED).end("deferred");
      })
      .catch((err: unknown) => res.writeHead(500).end(String(err)));
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  tech = await signIn(DEMO.technician);
});

afterAll(async () => {
  await new Promise((resolve) => server.close(resolve));
  await retirePrinters(db, printers);
  if (users.length) await db.updateTable("users").set({ active: false }).where("id", "in", users).execute();
  await close();
});

describe("the direct path answers the plain signed-in case", () => {
  it("with exactly the window the database writes, plain or gzip-encoded", async () => {
    const user = await makeUser("technician");
    const from = hoursFromNow(-72);
    const to = hoursFromNow(96);
    const res = await direct(windowPath(from, to), { cookie: await fresh(user) });
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/json");
    expect(res.headers["cache-control"]).toBe("private, no-cache");
    expect(res.headers.vary).toBe("Accept-Encoding");
    expect(res.headers["content-encoding"]).toBeUndefined();
    expect(Number(res.headers["content-length"])).toBe(res.bytes.length);
    const expected = withoutStamp(await loadFloorJson(db, { from: from.toISOString(), to: to.toISOString() }));
    expect(withoutStamp(res.bytes.toString("utf8"))).toEqual(expected);
    expect((expected.resources as unknown[]).length).toBeGreaterThan(0);

    for (const accept of ["gzip, deflate, br", "gzip;q=1, identity;q=0.5"]) {
      const zipped = await direct(windowPath(from, to), { cookie: await fresh(user), "accept-encoding": accept });
      expect(zipped.status).toBe(200);
      expect(zipped.headers["content-encoding"]).toBe("gzip");
      expect(Number(zipped.headers["content-length"])).toBe(zipped.bytes.length);
      expect(withoutStamp(gunzipSync(zipped.bytes).toString("utf8"))).toEqual(expected);
    }
    const refused = await direct(windowPath(from, to), { cookie: await fresh(user), "accept-encoding": "gzip;q=0, br" });
    expect(refused.headers["content-encoding"]).toBeUndefined();
  });

  it("for every role (each may read the shop)", async () => {
    const from = hoursFromNow(-24);
    const to = hoursFromNow(24);
    for (const role of ROLES) {
      const res = await direct(windowPath(from, to), { cookie: await fresh(await makeUser(role)) });
      expect(res.status, role).toBe(200);
    }
  });

  it("and a booking changed anywhere shows at the next request", async () => {
    const printer = await makePrinter(db, { materials: ["17-4PH"] });
    printers.push(printer.id);
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    const start = hoursFromNow(700);
    const booked = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: start.toISOString() } });
    expect(booked.status, JSON.stringify(booked.body)).toBe(200);
    const path = windowPath(new Date(start.getTime() - 86_400_000), new Date(start.getTime() + 86_400_000));
    const cookie = await fresh(await makeUser("technician"));
    const startOf = async () => {
      const body = JSON.parse((await direct(path, { cookie })).bytes.toString("utf8")) as { events: { id: string; start: string }[] };
      return new Date(body.events.find((e) => e.id === build.id)!.start).getTime();
    };
    expect(await startOf()).toBe(start.getTime());
    await db
      .updateTable("builds")
      .set({ starts_at: new Date(start.getTime() + 3_600_000), ends_at: sql`ends_at + interval '1 hour'` })
      .where("id", "=", build.id)
      .execute();
    expect(await startOf()).toBe(start.getTime() + 3_600_000);
  });
});

describe("the floor's change stamp", () => {
  it("is the same from both paths' queries and moves when a booking changes", async () => {
    const user = await makeUser("technician");
    const before = await floorChangeStamp(db);
    expect(before).toMatch(/^\d+:(true|false)$/);
    expect((await floorViewerAndStamp(db, user)).stamp).toBe(before);
    await db.updateTable("printers").set({ name: sql`name` }).where("id", "in", db.selectFrom("printers").select("id").limit(1)).execute();
    const after = await floorChangeStamp(db);
    expect(after).not.toBe(before);
    expect((await floorViewerAndStamp(db, user)).stamp).toBe(after);
  });
});

describe("everything else is left to the route handler", () => {
  const from = hoursFromNow(-24);
  const to = hoursFromNow(24);

  it("no cookie, a tampered cookie, another secret's cookie, a cookie for no user", async () => {
    const user = await makeUser("technician");
    const good = await fresh(user);
    const value = good.slice("hearth_session=".length);
    const i = Math.floor(value.length / 2);
    const flipped = `hearth_session=${value.slice(0, i)}${value[i] === "A" ? "B" : "A"}${value.slice(i + 1)}`;
    const cookies = [
      undefined,
      flipped,
      "hearth_session=garbage",
      `hearth_session=${"A".repeat(5000)}`,
      await cookieFor({ userId: user, issuedAt: Date.now(), seenAt: Date.now() }, "another-secret-another-secret-another-secret"),
      await cookieFor({ userId: randomUUID(), issuedAt: Date.now(), seenAt: Date.now() }),
      await cookieFor({ userId: "not-a-uuid", issuedAt: Date.now(), seenAt: Date.now() }),
      await cookieFor({}),
    ];
    for (const cookie of cookies) {
      const res = await direct(windowPath(from, to), cookie ? { cookie } : {});
      expect(res.status, cookie?.slice(0, 40) ?? "no cookie").toBe(DEFERRED);
    }
  });

  it("a session due for renewal, idle too long, too old, or issued before a sign-out everywhere", async () => {
    const user = await makeUser("technician");
    const now = Date.now();
    const cases: Record<string, Record<string, unknown>> = {
      "renewal due": { userId: user, issuedAt: now - 3_600_000, seenAt: now - (SESSION_RENEW_SECONDS + 30) * 1000 },
      "idle": { userId: user, issuedAt: now - (SESSION_IDLE_SECONDS + 120) * 1000, seenAt: now - (SESSION_IDLE_SECONDS + 60) * 1000 },
      "absolute": { userId: user, issuedAt: now - (SESSION_MAX_SECONDS + 60) * 1000, seenAt: now - 1000 },
    };
    for (const [name, data] of Object.entries(cases)) {
      expect((await direct(windowPath(from, to), { cookie: await cookieFor(data) })).status, name).toBe(DEFERRED);
    }
    const cookie = await fresh(user);
    expect((await direct(windowPath(from, to), { cookie })).status).toBe(200);
    await db.updateTable("users").set({ sessions_valid_after: sql`now()` }).where("id", "=", user).execute();
    expect((await direct(windowPath(from, to), { cookie })).status).toBe(DEFERRED);
  });

  it("a deactivated user", async () => {
    const user = await makeUser("furnace_operator");
    const cookie = await fresh(user);
    expect((await direct(windowPath(from, to), { cookie })).status).toBe(200);
    await db.updateTable("users").set({ active: false }).where("id", "=", user).execute();
    expect((await direct(windowPath(from, to), { cookie })).status).toBe(DEFERRED);
  });

  it("a window that is missing, malformed, backwards or too long; another method or address", async () => {
    const cookie = await fresh(await makeUser("manager"));
    const paths = [
      "/api/floor",
      "/api/floor?from=yesterday&to=today",
      windowPath(to, from),
      windowPath(from, new Date(from.getTime() + 46 * 86_400_000)),
      `${windowPath(from, to).replace("from=", "frm=")}`,
      "/api/floor/unscheduled",
      `/api/floorplan?from=${encodeURIComponent(from.toISOString())}&to=${encodeURIComponent(to.toISOString())}`,
    ];
    for (const p of paths) expect((await direct(p, { cookie })).status, p).toBe(DEFERRED);
    expect((await direct(windowPath(from, to), { cookie }, "POST")).status).toBe(DEFERRED);
    expect((await direct(windowPath(from, to), { cookie }, "HEAD")).status).toBe(DEFERRED);
  });
});

describe("through the running app", () => {
  const from = hoursFromNow(-48);
  const to = hoursFromNow(48);

  it("the direct answer and the route handler's answer are the same window", async () => {
    const user = await signIn(DEMO.furnace_operator);
    const plain = await api(windowPath(from, to), { cookie: user });
    expect(plain.status).toBe(200);
    expect(plain.headers.getSetCookie()).toEqual([]);
    // The same user with a session due for renewal goes through Next.js and gets a new cookie.
    const me = await db.selectFrom("users").select("id").where("email", "=", DEMO.furnace_operator).executeTakeFirstOrThrow();
    const now = Date.now();
    const due = await cookieFor({ userId: me.id, issuedAt: now - 3_600_000, seenAt: now - (SESSION_RENEW_SECONDS + 30) * 1000 });
    const renewed = await api(windowPath(from, to), { cookie: due });
    expect(renewed.status).toBe(200);
    expect(renewed.headers.getSetCookie().some((c) => c.startsWith("hearth_session=Fe26"))).toBe(true);
    const { stamp: _a, ...a } = plain.body;
    const { stamp: _b, ...b } = renewed.body;
    expect(a).toEqual(b);
  });

  it("refusals keep the route handler's answers: 401 signed out, 422 with the field for a bad window", async () => {
    expect((await api(windowPath(from, to))).status).toBe(401);
    const bad = await api("/api/floor?from=yesterday&to=today", { cookie: tech });
    expect(bad.status).toBe(422);
    expect(bad.body.error.fieldErrors.from).toBeDefined();
    const long = await api(windowPath(from, new Date(from.getTime() + 46 * 86_400_000)), { cookie: tech });
    expect(long.status).toBe(422);
    expect(long.body.error.fieldErrors.to.join(" ")).toMatch(/45 days/);
  });
});
