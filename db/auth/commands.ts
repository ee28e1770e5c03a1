import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { TokenKind } from "@/lib/auth/tokens";
import { type Executor, listRecentFailures } from "./reads";
import { recordEvents } from "@/db/versioned";
import { isUuid } from "@/lib/ids";

// Sign-in attempts ----------------------------------------------------------------------------

export async function insertSignInAttempt(db: Executor, row: { email: string; ip: string; succeeded: boolean }) {
  await db.insertInto("sign_in_attempts").values({ email: row.email.trim().toLowerCase().slice(0, 254), ip: row.ip, succeeded: row.succeeded }).execute();
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
  | "sessions_revoked"
  | "export";

export async function insertUserEvent(
  db: Executor,
  ev: { user_id: string | null; kind: UserEventKind; actor_id: string | null; from_state?: string | null; to_state?: string | null; reason?: string | null; data?: Record<string, unknown> },
) {
  await recordEvents(db, [{
      entity: "user",
      entity_id: ev.user_id,
      kind: ev.kind,
      actor_id: ev.actor_id,
      from_state: ev.from_state ?? null,
      to_state: ev.to_state ?? null,
      reason: ev.reason ?? null,
      data: ev.data,
    }]);
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

// Outbox rows for account mail ----------------------------------------------------------------

export async function insertAccountMail(
  db: Executor,
  row: { kind: "invite" | "password_reset"; subject_key: string; recipient_id: string; recipient_email: string; subject: string; text_body: string; html_body: string },
) {
  return db.insertInto("notification_outbox").values(row).returning(["id"]).executeTakeFirstOrThrow();
}

// Sessions (user_sessions) ----------------------------------------------------------------------

export type SessionEndReason = "sign_out" | "password_changed" | "password_reset" | "role_change" | "deactivated" | "sign_out_everywhere" | "other_sessions";

export async function insertUserSession(db: Executor, row: { user_id: string; ip: string; user_agent: string | null }) {
  return db
    .insertInto("user_sessions")
    .values({ user_id: row.user_id, ip: row.ip.slice(0, 64), user_agent: row.user_agent?.slice(0, 300) ?? null })
    .returning(["id", "created_at"])
    .executeTakeFirstOrThrow();
}

/** Ends the user's open sessions (all, or all but `keep`); returns how many were open. */
export async function revokeUserSessions(db: Executor, userId: string, reason: SessionEndReason, keep?: string): Promise<number> {
  let q = db.updateTable("user_sessions").set({ revoked_at: sql`now()`, revoked_reason: reason }).where("user_id", "=", userId).where("revoked_at", "is", null);
  if (keep && isUuid(keep)) q = q.where("id", "<>", keep);
  const rows = await q.returning("id").execute();
  return rows.length;
}

/** Ends one session (sign-out); false when it was not open. */
export async function revokeUserSession(db: Executor, sessionId: string, reason: SessionEndReason): Promise<boolean> {
  if (!isUuid(sessionId)) return false;
  const row = await db.updateTable("user_sessions").set({ revoked_at: sql`now()`, revoked_reason: reason }).where("id", "=", sessionId).where("revoked_at", "is", null).returning("id").executeTakeFirst();
  return !!row;
}

export async function touchUserSession(db: Executor, sessionId: string) {
  if (!isUuid(sessionId)) return;
  await db.updateTable("user_sessions").set({ last_seen_at: sql`now()` }).where("id", "=", sessionId).where("revoked_at", "is", null).execute();
}
