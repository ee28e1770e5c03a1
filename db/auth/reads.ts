import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import type { TokenKind } from "@/lib/auth/tokens";
import { SESSION_MAX_SECONDS } from "@/lib/auth/session-config";

export type Executor = Database | Transaction<DB>;

/**
 * Failure times that count towards throttling: for the account, those since its last success
 * (a correct password clears the slate); for the address, all in the window, since one address
 * trying many accounts is the pattern the per-address limit exists for. Rows from `beforeId` on
 * are left out: the caller's own provisional row and any that arrived after it.
 */
export async function listRecentFailures(
  db: Executor,
  email: string,
  ip: string,
  since: Date,
  beforeId?: number | string,
): Promise<{ account: number[]; address: number[] }> {
  const lower = email.trim().toLowerCase();
  const last = await db
    .selectFrom("sign_in_attempts")
    .select((eb) => eb.fn.max("created_at").as("at"))
    .where((eb) => eb(eb.fn("lower", ["email"]), "=", lower))
    .where("succeeded", "=", true)
    .where("created_at", ">", since)
    .executeTakeFirst();
  const accountSince = last?.at ? new Date(last.at) : since;
  let account = db
    .selectFrom("sign_in_attempts")
    .select("created_at")
    .where((eb) => eb(eb.fn("lower", ["email"]), "=", lower))
    .where("succeeded", "=", false)
    .where("created_at", ">", accountSince);
  let address = db.selectFrom("sign_in_attempts").select("created_at").where("ip", "=", ip).where("succeeded", "=", false).where("created_at", ">", since);
  if (beforeId !== undefined) {
    account = account.where(sql<boolean>`id < ${Number(beforeId)}`);
    address = address.where(sql<boolean>`id < ${Number(beforeId)}`);
  }
  const [a, b] = await Promise.all([account.execute(), address.execute()]);
  return { account: a.map((r) => new Date(r.created_at).getTime()), address: b.map((r) => new Date(r.created_at).getTime()) };
}

/** Reset-link requests from one address in the window (known and unknown accounts alike). */
export async function countResetRequestsFromAddress(db: Executor, ip: string, since: Date): Promise<number> {
  const row = await db
    .selectFrom("events")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where("entity", "=", "user")
    .where("kind", "=", "password_reset_requested")
    .where("created_at", ">", since)
    .where(sql<boolean>`data->>'ip' = ${ip}`)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

export async function listUserEvents(db: Executor, userId: string, limit = 20) {
  return db
    .selectFrom("events")
    .leftJoin("users as actor", "actor.id", "events.actor_id")
    .select(["events.id", "events.kind", "events.from_state", "events.to_state", "events.reason", "events.data", "events.created_at", "actor.name as actor_name"])
    .where("events.entity", "=", "user")
    .where("events.entity_id", "=", userId)
    .orderBy("events.created_at", "desc")
    .orderBy("events.id", "desc")
    .limit(limit)
    .execute();
}

export async function findAuthTokenByHash(db: Executor, tokenHash: string) {
  return db
    .selectFrom("auth_tokens")
    .innerJoin("users", "users.id", "auth_tokens.user_id")
    .select(["auth_tokens.id", "auth_tokens.kind", "auth_tokens.expires_at", "auth_tokens.used_at", "auth_tokens.user_id", "users.email", "users.name", "users.active"])
    .where("auth_tokens.token_hash", "=", tokenHash)
    .executeTakeFirst();
}

export async function countRecentTokens(db: Executor, userId: string, kind: TokenKind, since: Date): Promise<number> {
  const row = await db
    .selectFrom("auth_tokens")
    .select((eb) => eb.fn.countAll<number>().as("n"))
    .where("user_id", "=", userId)
    .where("kind", "=", kind)
    .where("created_by", "is", null)
    .where("created_at", ">", since)
    .executeTakeFirstOrThrow();
  return Number(row.n);
}

export async function findShopName(db: Executor): Promise<string> {
  const row = await db.selectFrom("shop_settings").select("shop_name").where("id", "=", 1).executeTakeFirst();
  return row?.shop_name ?? "your shop";
}

/** A person's open sessions, newest first (the settings page). */
export async function listOpenSessions(db: Executor, userId: string) {
  return db
    .selectFrom("user_sessions")
    .select(["id", "created_at", "last_seen_at", "ip", "user_agent"])
    .where("user_id", "=", userId)
    .where("revoked_at", "is", null)
    // a cookie past its absolute lifetime is dead even though nobody ended its row
    .where("created_at", ">", sql<Date>`now() - make_interval(secs => ${SESSION_MAX_SECONDS})`)
    .orderBy("last_seen_at", "desc")
    .limit(50)
    .execute();
}

export type SecurityEventFilter = { kind?: string; user?: string; from?: Date; to?: Date; limit: number };

/**
 * The security audit trail: every event about an account (sign-in and its failures, sign-out,
 * role changes, resets, ended sessions, exports), newest first, with who it concerned and who
 * acted. Filters: kind, a person by name or e-mail (or the address typed at a failed sign-in).
 */
export async function listSecurityEvents(db: Executor, f: SecurityEventFilter) {
  let q = db
    .selectFrom("events")
    .leftJoin("users as subject", "subject.id", "events.entity_id")
    .leftJoin("users as actor", "actor.id", "events.actor_id")
    .select([
      "events.id",
      "events.kind",
      "events.from_state",
      "events.to_state",
      "events.reason",
      "events.data",
      "events.created_at",
      "subject.name as subject_name",
      "subject.email as subject_email",
      "actor.name as actor_name",
    ])
    .where("events.entity", "=", "user");
  if (f.kind) q = q.where("events.kind", "=", f.kind);
  if (f.user) {
    const like = `%${f.user.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    q = q.where((eb) =>
      eb.or([eb("subject.email", "ilike", like), eb("subject.name", "ilike", like), eb(sql`events.data->>'email'`, "ilike", like)]),
    );
  }
  if (f.from) q = q.where("events.created_at", ">=", f.from);
  if (f.to) q = q.where("events.created_at", "<", f.to);
  return q.orderBy("events.created_at", "desc").orderBy("events.id", "desc").limit(f.limit).execute();
}
