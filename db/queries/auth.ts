import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB, Json } from "@/db/schema";
import type { TokenKind } from "@/lib/auth/tokens";

type Executor = Database | Transaction<DB>;

// Sign-in attempts ----------------------------------------------------------------------------

export async function insertSignInAttempt(db: Executor, row: { email: string; ip: string; succeeded: boolean }) {
  await db.insertInto("sign_in_attempts").values({ email: row.email.trim().toLowerCase().slice(0, 254), ip: row.ip, succeeded: row.succeeded }).execute();
}

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

/** A provisional failure, written before the password is checked so that parallel guesses see each other. */
export async function insertProvisionalFailure(db: Executor, email: string, ip: string) {
  return db
    .insertInto("sign_in_attempts")
    .values({ email: email.trim().toLowerCase().slice(0, 254), ip, succeeded: false })
    .returning(["id"])
    .executeTakeFirstOrThrow();
}

export async function markAttemptSucceeded(db: Executor, id: number | string) {
  await db.updateTable("sign_in_attempts").set({ succeeded: true }).where(sql<boolean>`id = ${Number(id)}`).execute();
}

/**
 * Writes the provisional failure and reads the failures before it under per-account and
 * per-address advisory locks, so parallel guesses are counted one after another: without
 * them a guess could commit before an earlier id became visible and count one too few.
 */
export async function reserveSignInAttempt(db: Database, email: string, ip: string, since: Date) {
  return db.transaction().execute(async (trx) => {
    await sql`select pg_advisory_xact_lock(hashtext(${`sign-in:account:${email.trim().toLowerCase()}`}))`.execute(trx);
    await sql`select pg_advisory_xact_lock(hashtext(${`sign-in:address:${ip}`}))`.execute(trx);
    const attempt = await insertProvisionalFailure(trx, email, ip);
    const failures = await listRecentFailures(trx, email, ip, since, attempt.id);
    return { attempt, failures };
  });
}

/** A throttled attempt was never checked, so it does not count as a failure. */
export async function deleteAttempt(db: Executor, id: number | string) {
  await db.deleteFrom("sign_in_attempts").where(sql<boolean>`id = ${Number(id)}`).execute();
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

// Audit events --------------------------------------------------------------------------------

export type UserEventKind =
  | "sign_in"
  | "sign_in_failed"
  | "sign_out"
  | "role_change"
  | "deactivated"
  | "reactivated"
  | "invited"
  | "password_set"
  | "password_reset_requested"
  | "password_reset"
  | "password_changed"
  | "profile_change"
  | "sessions_revoked";

export async function insertUserEvent(
  db: Executor,
  ev: { user_id: string | null; kind: UserEventKind; actor_id: string | null; from_state?: string | null; to_state?: string | null; reason?: string | null; data?: Record<string, unknown> },
) {
  await db
    .insertInto("events")
    .values({
      entity: "user",
      entity_id: ev.user_id,
      kind: ev.kind,
      actor_id: ev.actor_id,
      from_state: ev.from_state ?? null,
      to_state: ev.to_state ?? null,
      reason: ev.reason ?? null,
      data: ev.data ? (JSON.stringify(ev.data) as unknown as Json) : null,
    })
    .execute();
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

// Set-password tokens -------------------------------------------------------------------------

/**
 * Issuing a new link makes the older open links of the same kind useless, and withdraws their
 * e-mails still waiting in the outbox (a relay that was down must not deliver a dead link later).
 */
export async function revokeOpenTokens(db: Executor, userId: string, kind: TokenKind) {
  const revoked = await db
    .updateTable("auth_tokens")
    .set({ used_at: sql`now()` })
    .where("user_id", "=", userId)
    .where("kind", "=", kind)
    .where("used_at", "is", null)
    .returning("id")
    .execute();
  if (revoked.length === 0) return;
  await db
    .updateTable("notification_outbox")
    .set({ status: "failed", last_error: "withdrawn: a newer link replaced this one, or the account changed" })
    .where("kind", "=", kind === "invite" ? "invite" : "password_reset")
    .where("status", "=", "pending")
    .where("subject_key", "in", revoked.map((r) => r.id))
    .execute();
}

export async function insertAuthToken(db: Executor, row: { user_id: string; kind: TokenKind; token_hash: string; expires_at: Date; created_by: string | null }) {
  return db.insertInto("auth_tokens").values(row).returning(["id", "expires_at"]).executeTakeFirstOrThrow();
}

export async function findAuthTokenByHash(db: Executor, tokenHash: string) {
  return db
    .selectFrom("auth_tokens")
    .innerJoin("users", "users.id", "auth_tokens.user_id")
    .select(["auth_tokens.id", "auth_tokens.kind", "auth_tokens.expires_at", "auth_tokens.used_at", "auth_tokens.user_id", "users.email", "users.name", "users.active"])
    .where("auth_tokens.token_hash", "=", tokenHash)
    .executeTakeFirst();
}

/** Marks the token used if it is still open and unexpired; undefined when it was not. Atomic. */
export async function consumeAuthToken(db: Executor, tokenHash: string) {
  return db
    .updateTable("auth_tokens")
    .set({ used_at: sql`now()` })
    .where("token_hash", "=", tokenHash)
    .where("used_at", "is", null)
    .where("expires_at", ">", sql<Date>`now()`)
    .returning(["id", "user_id", "kind"])
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

// Outbox rows for account mail ----------------------------------------------------------------

export async function insertAccountMail(
  db: Executor,
  row: { kind: "invite" | "password_reset"; subject_key: string; recipient_id: string; recipient_email: string; subject: string; text_body: string; html_body: string },
) {
  return db.insertInto("notification_outbox").values(row).returning(["id"]).executeTakeFirstOrThrow();
}

export async function findShopName(db: Executor): Promise<string> {
  const row = await db.selectFrom("shop_settings").select("shop_name").where("id", "=", 1).executeTakeFirst();
  return row?.shop_name ?? "your shop";
}
