// Session cookie settings shared by app/_server/session.ts and proxy.ts (no next/* imports here).

export type SessionData = {
  userId?: string;
  issuedAt?: number; // ms; the absolute lifetime counts from here
  seenAt?: number; // ms; the idle lifetime slides from here
  sid?: string; // the user_sessions row; signed in only while that row is open
};

export const SESSION_COOKIE = "hearth_session";
/** Idle lifetime: the cookie and its seal expire this long after the last renewal. */
export const SESSION_IDLE_SECONDS = 8 * 60 * 60;
/** Absolute lifetime: sign in again after this, however active. */
export const SESSION_MAX_SECONDS = 7 * 24 * 60 * 60;
/** Renew at most this often, so a busy page does not rewrite its cookie on every request. */
export const SESSION_RENEW_SECONDS = 5 * 60;

/**
 * The one rule for "is this cookie still a session", for every door that checks one
 * (app/_server/session.ts for pages, handlers and actions; app/_server/shared-read-direct.ts for
 * the web server's direct floor answer). `sessionOpen` is whether the cookie's user_sessions row
 * is still open, read in the same query as the user (db/users/reads.ts sessionOpenSql); only
 * proxy.ts, whose check is optimistic, passes "unchecked".
 * pg returns the column's default '-infinity' as the number -Infinity, not a Date.
 */
export function sessionIsLive(data: SessionData, validAfter: Date | number | null, now: number, sessionOpen: boolean | "unchecked"): boolean {
  if (!data.userId || !data.issuedAt || !data.seenAt) return false;
  if (sessionOpen === false) return false;
  if (now - data.issuedAt > SESSION_MAX_SECONDS * 1000) return false;
  if (now - data.seenAt > SESSION_IDLE_SECONDS * 1000) return false;
  const after = validAfter instanceof Date ? validAfter.getTime() : (validAfter ?? -Infinity);
  if (data.issuedAt < after) return false;
  return true;
}

/** Whether a request with this session should get a re-sealed cookie (the idle lifetime slides). */
export function renewalDue(data: SessionData, now = Date.now()): boolean {
  return !!data.userId && !!data.seenAt && now - data.seenAt > SESSION_RENEW_SECONDS * 1000;
}
