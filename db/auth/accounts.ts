// Account operations shared by the route handlers and the server actions: sign-in with
// throttling, invitations and reset links, admin changes, a person's own settings. Framework-free
// (no next/*): the callers own the cookie. Every operation writes its audit event.
import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { revokeUserSessions, consumeAuthToken, deleteAttempt, insertAccountMail, insertAuthToken, insertUserEvent, reserveSignInAttempt, markAttemptSucceeded, revokeOpenTokens } from "@/db/auth/commands";
import { countRecentTokens, countResetRequestsFromAddress, findAuthTokenByHash, findShopName } from "@/db/auth/reads";
import { countOtherActiveAdmins, findPasswordHash, findUserByEmail, findUserById, type CurrentUser } from "@/db/users/reads";
import { insertUser, lockUserById, recordSignIn, updateUser, type UserPatch } from "@/db/users/commands";
import { AppError } from "@/lib/errors";
import { getEnv } from "@/lib/env";
import { sendOutboxRow, type SendOutcome } from "@/db/notifications/send";
import { accountMail } from "@/lib/auth/mail";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { ROLE_LABELS, type Role } from "@/lib/auth/permissions";
import type { CreateUserInput, UpdateProfileInput, UpdateUserInput } from "@/lib/auth/schemas";
import { THROTTLE_WINDOW_MS, throttleMessage, throttleVerdict } from "@/lib/auth/throttle";
import { TOKEN_TTL_MS, hashToken, looksLikeToken, newToken, setPasswordUrl, type TokenKind } from "@/lib/auth/tokens";

/** One message for an unknown address, a wrong password and a deactivated account. */
export const BAD_CREDENTIALS = "That e-mail address and password do not match an active account.";

export type Actor = { id: string; name: string; role: Role };

// A hash to verify against when the account is unknown or has no password yet, so every path
// costs one argon2 verification.
let dummyHash: Promise<string> | undefined;
const getDummyHash = () => (dummyHash ??= hashPassword(crypto.randomUUID()));

const pgCode = (err: unknown) => (err as { code?: string } | null)?.code;

// Sign-in ---------------------------------------------------------------------------------

export async function signInWithPassword(db: Database, input: { email: string; password: string; ip: string }) {
  const { attempt, failures } = await reserveSignInAttempt(db, input.email, input.ip, new Date(Date.now() - THROTTLE_WINDOW_MS));
  // "Now" is read after the reservation: waiting for the lock, earlier attempts may have been
  // stamped later than a clock read before it, and a failure from the "future" would not count.
  const now = Date.now();
  const verdict = throttleVerdict(failures.account, failures.address, now);
  const user = await findUserByEmail(db, input.email);
  if (verdict.blocked) {
    await deleteAttempt(db, attempt.id);
    await insertUserEvent(db, {
      user_id: user?.id ?? null,
      kind: "sign_in_failed",
      actor_id: null,
      reason: "throttled",
      data: { ip: input.ip, email: input.email.toLowerCase(), scope: verdict.scope, retry_after_s: verdict.retry_after_s },
    });
    throw new AppError("too_many_requests", throttleMessage(verdict), undefined, { retry_after_s: verdict.retry_after_s, scope: verdict.scope });
  }
  const ok = await verifyPassword(user?.password_hash ?? (await getDummyHash()), input.password);
  if (!user || !user.active || !user.password_hash || !ok) {
    const reason = !user ? "unknown_account" : !user.active ? "deactivated" : !user.password_hash ? "no_password" : "wrong_password";
    await insertUserEvent(db, { user_id: user?.id ?? null, kind: "sign_in_failed", actor_id: null, reason, data: { ip: input.ip, email: input.email.toLowerCase() } });
    throw new AppError("unauthenticated", BAD_CREDENTIALS);
  }
  await markAttemptSucceeded(db, attempt.id);
  await recordSignIn(db, user.id);
  await insertUserEvent(db, { user_id: user.id, kind: "sign_in", actor_id: user.id, data: { ip: input.ip } });
  return { id: user.id, name: user.name, role: user.role };
}

export async function recordSignOut(db: Database, userId: string, ip: string) {
  await insertUserEvent(db, { user_id: userId, kind: "sign_out", actor_id: userId, data: { ip } });
}

// Set-password links --------------------------------------------------------------------------

type LinkTarget = { id: string; email: string; name: string };

/** Writes a token and its e-mail into the outbox in the caller's transaction; the caller sends it. */
async function issueLink(trx: Transaction<DB>, user: LinkTarget, kind: TokenKind, actor: Actor | null) {
  const token = newToken();
  await revokeOpenTokens(trx, user.id, kind);
  const row = await insertAuthToken(trx, {
    user_id: user.id,
    kind,
    token_hash: hashToken(token),
    expires_at: new Date(Date.now() + TOKEN_TTL_MS[kind]),
    created_by: actor?.id ?? null,
  });
  const mail = accountMail(kind, { name: user.name, shopName: await findShopName(trx), link: setPasswordUrl(getEnv().APP_URL, token), invitedBy: actor?.name });
  const outbox = await insertAccountMail(trx, {
    kind: kind === "invite" ? "invite" : "password_reset",
    subject_key: row.id,
    recipient_id: user.id,
    recipient_email: user.email,
    subject: mail.subject,
    text_body: mail.text,
    html_body: mail.html,
  });
  return { outbox_id: outbox.id, token_id: row.id, expires_at: row.expires_at };
}

export type MailResult = { status: "sent" | "queued"; expires_at: Date; error?: string };

/** Sends at once; a failure leaves the row pending for the worker's outbox sweep and says so. */
async function sendNow(db: Database, outboxId: string, expiresAt: Date): Promise<MailResult> {
  let outcome: SendOutcome;
  try {
    outcome = await sendOutboxRow(db, outboxId);
  } catch (err) {
    outcome = { status: "failed", error: err instanceof Error ? err.message : String(err), attempts: 0 };
  }
  if (outcome.status === "sent") return { status: "sent", expires_at: expiresAt };
  return { status: "queued", expires_at: expiresAt, error: outcome.status === "failed" ? outcome.error : undefined };
}

export async function createUserAndInvite(db: Database, actor: Actor, input: CreateUserInput) {
  const taken = await findUserByEmail(db, input.email);
  if (taken) throw new AppError("conflict", "An account with this e-mail address exists already.", { email: ["An account with this e-mail address exists already"] });
  let created;
  try {
    created = await db.transaction().execute(async (trx) => {
      const user = await insertUser(trx, input);
      const link = await issueLink(trx, user, "invite", actor);
      await insertUserEvent(trx, { user_id: user.id, kind: "invited", actor_id: actor.id, to_state: input.role, data: { email: user.email } });
      return { user, link };
    });
  } catch (err) {
    if (pgCode(err) === "23505") throw new AppError("conflict", "An account with this e-mail address exists already.", { email: ["An account with this e-mail address exists already"] });
    throw err;
  }
  const mail = await sendNow(db, created.link.outbox_id, created.link.expires_at);
  return { user: (await findUserById(db, created.user.id))!, mail };
}

/** An admin's "send link": a reset for someone with a password, a fresh invitation otherwise. */
export async function sendAccountLink(db: Database, actor: Actor, userId: string) {
  const issued = await db.transaction().execute(async (trx) => {
    const user = await lockUserById(trx, userId);
    if (!user) throw new AppError("not_found", "No such user.");
    if (!user.active) throw new AppError("conflict", `${user.name} is deactivated; reactivate the account before sending a link.`);
    const kind: TokenKind = user.password_hash ? "reset" : "invite";
    const link = await issueLink(trx, user, kind, actor);
    await insertUserEvent(trx, {
      user_id: user.id,
      kind: kind === "reset" ? "password_reset_requested" : "invited",
      actor_id: actor.id,
      data: { by: "admin", resend: kind === "invite" },
    });
    return { link, kind };
  });
  const mail = await sendNow(db, issued.link.outbox_id, issued.link.expires_at);
  return { kind: issued.kind, mail };
}

/** Self-service reset links allowed per account per window; more are dropped without a word. */
export const RESET_REQUESTS_PER_ACCOUNT = 3;
/** Reset requests per address per window before a 429 (said the same way for any address typed). */
export const RESET_REQUESTS_PER_ADDRESS = 10;

export const FORGOT_ANSWER = "If that address belongs to an active account, a link to set a new password is on its way. It works for 1 hour.";

/**
 * "Forgot password". Answers the same whether or not the address has an account; returns the
 * outbox row to send (after the response, so the timing says nothing either), or null.
 */
export async function requestPasswordReset(db: Database, email: string, ip: string): Promise<string | null> {
  const since = new Date(Date.now() - THROTTLE_WINDOW_MS);
  if ((await countResetRequestsFromAddress(db, ip, since)) >= RESET_REQUESTS_PER_ADDRESS) {
    throw new AppError("too_many_requests", "Too many reset requests from this address. Wait 15 minutes and try again.", undefined, { retry_after_s: 900 });
  }
  const user = await findUserByEmail(db, email);
  if (!user || !user.active) {
    await insertUserEvent(db, { user_id: null, kind: "password_reset_requested", actor_id: null, reason: user ? "deactivated" : "unknown_account", data: { ip, email: email.toLowerCase() } });
    return null;
  }
  if ((await countRecentTokens(db, user.id, "reset", since)) >= RESET_REQUESTS_PER_ACCOUNT) {
    await insertUserEvent(db, { user_id: user.id, kind: "password_reset_requested", actor_id: null, reason: "limited", data: { ip } });
    return null;
  }
  return db.transaction().execute(async (trx) => {
    const link = await issueLink(trx, user, "reset", null);
    await insertUserEvent(trx, { user_id: user.id, kind: "password_reset_requested", actor_id: null, data: { ip, by: "self" } });
    return link.outbox_id;
  });
}

export type TokenState =
  | { state: "valid"; kind: TokenKind; email: string; name: string; expires_at: Date }
  | { state: "used" | "expired" | "unknown" | "inactive" };

/** What the set-password page shows before anyone types: never consumes the token. */
export async function inspectToken(db: Database, token: string): Promise<TokenState> {
  if (!looksLikeToken(token)) return { state: "unknown" };
  const row = await findAuthTokenByHash(db, hashToken(token));
  if (!row) return { state: "unknown" };
  if (row.used_at) return { state: "used" };
  if (new Date(row.expires_at).getTime() <= Date.now()) return { state: "expired" };
  if (!row.active) return { state: "inactive" };
  return { state: "valid", kind: row.kind, email: row.email, name: row.name, expires_at: new Date(row.expires_at) };
}

const TOKEN_MESSAGES = {
  used: "This link has been used already. Ask for a new one from the sign-in page.",
  expired: "This link has expired. Ask for a new one from the sign-in page.",
  unknown: "This link is not valid. Check that you copied all of it, or ask for a new one.",
  inactive: "This account is deactivated. Ask an admin.",
} as const;

export function tokenProblem(state: keyof typeof TOKEN_MESSAGES): AppError {
  const code = state === "used" ? "conflict" : state === "inactive" ? "forbidden" : "invalid";
  return new AppError(code, TOKEN_MESSAGES[state], { token: [TOKEN_MESSAGES[state]] }, { token_state: state });
}

/** Uses a link once: sets the password and ends every session the account had. */
export async function setPasswordWithToken(db: Database, token: string, password: string) {
  if (!looksLikeToken(token)) throw tokenProblem("unknown");
  const passwordHash = await hashPassword(password);
  const tokenHash = hashToken(token);
  return db.transaction().execute(async (trx) => {
    const used = await consumeAuthToken(trx, tokenHash);
    if (!used) {
      const row = await findAuthTokenByHash(trx, tokenHash);
      throw tokenProblem(!row ? "unknown" : row.used_at ? "used" : "expired");
    }
    const user = await lockUserById(trx, used.user_id);
    if (!user || !user.active) throw tokenProblem("inactive");
    await updateUser(trx, user.id, { password_hash: passwordHash, sessions_valid_after: new Date() });
    const ended = await revokeUserSessions(trx, user.id, "password_reset");
    await revokeOpenTokens(trx, user.id, "reset");
    await revokeOpenTokens(trx, user.id, "invite");
    if (ended) await insertUserEvent(trx, { user_id: user.id, kind: "sessions_revoked", actor_id: user.id, reason: "password_reset", data: { sessions: ended } });
    await insertUserEvent(trx, { user_id: user.id, kind: used.kind === "invite" ? "password_set" : "password_reset", actor_id: user.id, data: { token_id: used.id } });
    return { id: user.id, email: user.email, kind: used.kind };
  });
}

// Admin changes -----------------------------------------------------------------------------

export async function updateUserByAdmin(db: Database, actor: Actor, id: string, input: UpdateUserInput) {
  await db.transaction().execute(async (trx) => {
    // Admin changes are rare; one lock for all of them keeps two admins from demoting each other
    // at the same moment (row locks taken in opposite orders would deadlock instead).
    await sql`select pg_advisory_xact_lock(hashtext('hearth.users.admin-changes'))`.execute(trx);
    const user = await lockUserById(trx, id);
    if (!user) throw new AppError("not_found", "No such user.");
    if (user.version !== input.version) {
      throw new AppError("conflict", `Someone else changed ${user.name}'s account a moment ago; reload to see the change and try again.`, undefined, { current_version: user.version });
    }
    const roleChanges = input.role !== undefined && input.role !== user.role;
    const activeChanges = input.active !== undefined && input.active !== user.active;
    if (activeChanges && input.active === false && user.id === actor.id) {
      throw new AppError("invalid", "You cannot deactivate your own account; another admin can.", { active: ["You cannot deactivate your own account"] });
    }
    const losesAdmin = user.role === "admin" && user.active && ((roleChanges && input.role !== "admin") || (activeChanges && input.active === false));
    if (losesAdmin && (await countOtherActiveAdmins(trx, user.id)) === 0) {
      throw new AppError("conflict", `${user.name} is the last active admin. Make someone else an admin first.`);
    }
    const patch: UserPatch = {};
    if (input.name !== undefined && input.name !== user.name) patch.name = input.name;
    // A new role or a deactivation ends every session the person has: they sign in again and
    // see the pages of their new role (and a later reactivation revives no old cookie).
    if (roleChanges) {
      patch.role = input.role;
      patch.sessions_valid_after = new Date();
    }
    if (activeChanges) {
      patch.active = input.active;
      if (input.active === false) patch.sessions_valid_after = new Date();
    }
    if (Object.keys(patch).length === 0) return;
    await updateUser(trx, user.id, patch);
    if (patch.name) await insertUserEvent(trx, { user_id: user.id, kind: "profile_change", actor_id: actor.id, from_state: user.name, to_state: patch.name, data: { field: "name" } });
    if (roleChanges) {
      await insertUserEvent(trx, { user_id: user.id, kind: "role_change", actor_id: actor.id, from_state: user.role, to_state: input.role!, reason: `${ROLE_LABELS[user.role]} → ${ROLE_LABELS[input.role!]}` });
    }
    if (patch.sessions_valid_after) {
      const reason = activeChanges && input.active === false ? "deactivated" : "role_change";
      const ended = await revokeUserSessions(trx, user.id, reason);
      await insertUserEvent(trx, { user_id: user.id, kind: "sessions_revoked", actor_id: actor.id, reason, data: { sessions: ended } });
    }
    if (activeChanges) {
      await insertUserEvent(trx, { user_id: user.id, kind: input.active ? "reactivated" : "deactivated", actor_id: actor.id, from_state: user.active ? "active" : "inactive", to_state: input.active ? "active" : "inactive" });
      if (input.active === false) {
        await revokeOpenTokens(trx, user.id, "reset");
        await revokeOpenTokens(trx, user.id, "invite");
      }
    }
  });
  return (await findUserById(db, id))!;
}

// A person's own settings -------------------------------------------------------------------

export async function updateOwnProfile(db: Database, user: CurrentUser, input: UpdateProfileInput) {
  const patch: UserPatch = {};
  if (input.name !== undefined && input.name !== user.name) patch.name = input.name;
  if (input.unit_pref !== undefined && input.unit_pref !== user.unit_pref) patch.unit_pref = input.unit_pref;
  if (input.muted_mail !== undefined) patch.muted_mail = [...new Set(input.muted_mail)].sort();
  if (Object.keys(patch).length > 0) {
    await db.transaction().execute(async (trx) => {
      await updateUser(trx, user.id, patch);
      await insertUserEvent(trx, { user_id: user.id, kind: "profile_change", actor_id: user.id, data: { fields: Object.keys(patch) } });
    });
  }
}

/**
 * Changes one's own password. A wrong current password counts as a failed sign-in for the
 * account, so a borrowed session cannot be used to guess it. Returns the new session cut-off:
 * the caller re-issues its own cookie from that instant, every other session ends.
 */
export async function changeOwnPassword(db: Database, user: CurrentUser, current: string, next: string, ip: string): Promise<number> {
  const { attempt, failures } = await reserveSignInAttempt(db, user.email, ip, new Date(Date.now() - THROTTLE_WINDOW_MS));
  const now = Date.now(); // after the reservation, as in signInWithPassword
  const verdict = throttleVerdict(failures.account, failures.address, now);
  if (verdict.blocked) {
    await deleteAttempt(db, attempt.id);
    throw new AppError("too_many_requests", throttleMessage(verdict), undefined, { retry_after_s: verdict.retry_after_s });
  }
  const stored = await findPasswordHash(db, user.id);
  if (!stored || !(await verifyPassword(stored, current))) {
    await insertUserEvent(db, { user_id: user.id, kind: "sign_in_failed", actor_id: user.id, reason: "wrong_current_password", data: { ip } });
    throw new AppError("invalid", "Your current password is not right.", { current_password: ["Your current password is not right"] });
  }
  await markAttemptSucceeded(db, attempt.id);
  const passwordHash = await hashPassword(next);
  const cutoff = Date.now();
  await db.transaction().execute(async (trx) => {
    await updateUser(trx, user.id, { password_hash: passwordHash, sessions_valid_after: new Date(cutoff) });
    const ended = await revokeUserSessions(trx, user.id, "password_changed");
    await revokeOpenTokens(trx, user.id, "reset");
    await insertUserEvent(trx, { user_id: user.id, kind: "password_changed", actor_id: user.id, data: { ip, sessions_ended: ended } });
  });
  return cutoff;
}

/** "Sign out other sessions": every session of the person but the one making the request ends. */
export async function revokeOtherSessions(db: Database, user: CurrentUser): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const ended = await revokeUserSessions(trx, user.id, "other_sessions", user.session_id ?? undefined);
    await insertUserEvent(trx, { user_id: user.id, kind: "sessions_revoked", actor_id: user.id, reason: "other_sessions", data: { sessions: ended } });
    return ended;
  });
}

/** An admin's "sign out everywhere" for a person (themselves included): every session ends at once. */
export async function revokeAllSessions(db: Database, actor: Actor, userId: string): Promise<number> {
  return db.transaction().execute(async (trx) => {
    const user = await lockUserById(trx, userId);
    if (!user) throw new AppError("not_found", "No such user.");
    const ended = await revokeUserSessions(trx, user.id, "sign_out_everywhere");
    await insertUserEvent(trx, { user_id: user.id, kind: "sessions_revoked", actor_id: actor.id, reason: "sign_out_everywhere", data: { sessions: ended } });
    return ended;
  });
}
