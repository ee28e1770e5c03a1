import { randomUUID } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { sql } from "kysely";
import { changeStamp, sessionKeyOf, viewerAndStamp, viewersAndStamps, type SessionKey } from "@/db/live/stamps";
import { testDb } from "../helpers/db";

// The sign-in check of many requests in one round trip (db/live/stamps.ts viewersAndStamps, used
// by app/_server/floor-access.ts for every shared read) must admit exactly whom the check of one
// request (viewerAndStamp) admits, on the real database: an open session, a revoked one, a
// deactivated user, a sign-out everywhere, a made-up session id or user id.

const { db, close } = testDb();
const users: string[] = [];

afterAll(async () => {
  if (users.length) {
    await db.deleteFrom("user_sessions").where("user_id", "in", users).execute();
    await db.deleteFrom("users").where("id", "in", users).execute();
  }
  await close();
});

async function user(active = true) {
  const row = await db
    .insertInto("users")
    .values({ email: `admission-${randomUUID()}@test.hearth.test`, name: "Admission check", role: "technician", active })
    .returning("id")
    .executeTakeFirstOrThrow();
  users.push(row.id);
  return row.id;
}

async function session(userId: string) {
  const { rows } = await sql<{ id: string }>`insert into user_sessions (user_id) values (${userId}) returning id`.execute(db);
  return rows[0].id;
}

describe("viewersAndStamps", () => {
  it("admits, one round trip for many, exactly whom viewerAndStamp admits", async () => {
    const open = await user();
    const openSid = await session(open);
    const revoked = await user();
    const revokedSid = await session(revoked);
    await sql`update user_sessions set revoked_at = now() where id = ${revokedSid}`.execute(db);
    const inactive = await user(false);
    const inactiveSid = await session(inactive);
    const everywhere = await user();
    const everywhereSid = await session(everywhere);
    await db.updateTable("users").set({ sessions_valid_after: sql`now()` }).where("id", "=", everywhere).execute();
    const keys: SessionKey[] = [
      { userId: open, sid: openSid },
      { userId: open, sid: openSid },
      { userId: open, sid: revokedSid }, // another user's session row
      { userId: open, sid: randomUUID() },
      { userId: open, sid: "not-a-uuid" },
      { userId: open },
      { userId: revoked, sid: revokedSid },
      { userId: inactive, sid: inactiveSid },
      { userId: everywhere, sid: everywhereSid },
      { userId: randomUUID(), sid: openSid },
      { userId: "not-a-uuid", sid: openSid },
    ];
    const many = await viewersAndStamps(db, keys);
    for (const k of keys) {
      const one = await viewerAndStamp(db, "floor", k.userId, k.sid);
      expect(many.viewers.get(sessionKeyOf(k)) ?? null, JSON.stringify(k)).toEqual(one.viewer);
    }
    expect(many.viewers.get(sessionKeyOf({ userId: open, sid: openSid }))?.session_open).toBe(true);
    expect(many.viewers.get(sessionKeyOf({ userId: revoked, sid: revokedSid }))?.session_open).toBe(false);
    expect(many.viewers.has(sessionKeyOf({ userId: inactive, sid: inactiveSid }))).toBe(false);
    const validAfter = many.viewers.get(sessionKeyOf({ userId: everywhere, sid: everywhereSid }))?.sessions_valid_after;
    expect(typeof validAfter === "number" && validAfter > Date.now() - 60_000).toBe(true);
  });

  it("reads every stamp as changeStamp does, with no session asked or none known", async () => {
    for (const keys of [[], [{ userId: randomUUID() }]]) {
      const { stamps, viewers } = await viewersAndStamps(db, keys);
      expect(viewers.size).toBe(0);
      expect(stamps).toEqual({ floor: await changeStamp(db, "floor"), board: await changeStamp(db, "board"), shop: await changeStamp(db, "shop") });
    }
  });
});
