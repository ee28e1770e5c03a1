import { cache } from "react";
import { cookies, headers } from "next/headers";
import { redirect } from "next/navigation";
import { getIronSession, type SessionOptions } from "iron-session";
import { getDb } from "@/db/client";
import { findActiveUserById, type CurrentUser } from "@/db/users/reads";
import { insertUserSession, revokeUserSession, touchUserSession } from "@/db/auth/commands";
import { AppError } from "@/lib/errors";
import { can, type Permission, type Role } from "@/lib/auth/permissions";
import { actorCan } from "@/lib/auth/api-scopes";
import { authenticateBearer, currentBearer } from "@/app/_server/api-token-auth";
import { PEER_HEADER, clientAddress, parseTrustedProxies, type TrustedProxies } from "@/lib/http/client-address";
import { getEnv } from "@/lib/env";
import { safeNextPath } from "@/lib/http/safe-next";

export type { CurrentUser };

import { SESSION_COOKIE, SESSION_IDLE_SECONDS, renewalDue, sessionIsLive, type SessionData } from "@/lib/auth/session-config";
import { unsealSession } from "@/lib/auth/seal-cache";
import { noteUser } from "./request-context";

export { SESSION_COOKIE, SESSION_IDLE_SECONDS, SESSION_MAX_SECONDS, SESSION_RENEW_SECONDS, sessionIsLive, type SessionData } from "@/lib/auth/session-config";

export function sessionOptions(secure: boolean): SessionOptions {
  const password = process.env.SESSION_SECRET;
  if (!password || password.length < 32) throw new Error("SESSION_SECRET must be set to at least 32 characters");
  return {
    password,
    cookieName: SESSION_COOKIE,
    ttl: SESSION_IDLE_SECONDS,
    cookieOptions: { httpOnly: true, sameSite: "lax", secure, path: "/" },
  };
}

/** Secure cookies whenever the request reached us over https (directly or via a proxy). */
export async function requestIsHttps(): Promise<boolean> {
  const h = await headers();
  const proto = h.get("x-forwarded-proto") ?? "";
  if (proto) return proto.split(",")[0].trim() === "https";
  return (process.env.APP_URL ?? "").startsWith("https://");
}

export async function getSession() {
  return getIronSession<SessionData>(await cookies(), sessionOptions(await requestIsHttps()));
}

/**
 * Starts a fresh session for the user (sign-in), or a new one after a password change: a
 * user_sessions row of its own, named in the sealed cookie, so that it can be ended on the server.
 */
export async function startSession(userId: string, now = Date.now()) {
  const row = await insertUserSession(getDb(), { user_id: userId, ip: await requestAddress(), user_agent: (await headers()).get("user-agent") });
  const session = await getSession();
  session.userId = userId;
  session.sid = row.id;
  session.issuedAt = now;
  session.seenAt = now;
  await session.save();
}

/** Signs out: ends the session's row (every copy of the cookie stops working) and clears the cookie. */
export async function endSession() {
  const data = await readSession();
  if (data?.sid) await revokeUserSession(getDb(), data.sid, "sign_out");
  const session = await getSession();
  session.destroy();
}

let trusted: { list: string; parsed: TrustedProxies } | undefined;
function trustedProxies(): TrustedProxies {
  const list = getEnv().TRUSTED_PROXIES;
  if (trusted?.list !== list) trusted = { list, parsed: parseTrustedProxies(list) };
  return trusted.parsed;
}

/**
 * The client's address for throttling and the audit trail: the socket peer (set by
 * scripts/serve.ts), or what trusted proxies forwarded (lib/http/client-address.ts).
 */
export async function requestAddress(): Promise<string> {
  const h = await headers();
  return clientAddress(h.get(PEER_HEADER), h.get("x-forwarded-for"), trustedProxies());
}

/** What the request's session cookie holds; null without one, or for a tampered or expired seal. */
const readSession = cache(async (): Promise<SessionData | null> => {
  const seal = (await cookies()).get(SESSION_COOKIE)?.value;
  if (!seal) return null;
  try {
    const data = await unsealSession(seal, sessionOptions(false).password as string);
    return data.userId ? data : null;
  } catch {
    return null;
  }
});

/**
 * The signed-in user, re-read from the database on every request so that a role change or a
 * deactivation takes effect at once. A tampered, expired or revoked cookie means signed out.
 */
export const getCurrentUser = cache(async (): Promise<CurrentUser | null> => {
  const data = await readSession();
  if (!data) return null;
  const user = await findActiveUserById(getDb(), data.userId!, data.sid);
  if (!user || !sessionIsLive(data, user.sessions_valid_after, Date.now(), user.session_open)) return null;
  return user;
});

/**
 * Slides the idle lifetime for API calls and server actions (proxy.ts does it for pages, where
 * a server component may not set cookies). At most once per renewal interval.
 */
export async function renewIfDue(now = Date.now()): Promise<void> {
  const data = await readSession();
  if (!data || !renewalDue(data, now)) return;
  const session = await getSession();
  if (!session.userId) return;
  session.seenAt = now;
  await session.save();
  if (data.sid) await touchUserSession(getDb(), data.sid);
}

/** The 403 a role without the permission gets from any API. */
export function forbidden(role: Role, permission: Permission): AppError {
  return new AppError("forbidden", `Your role (${role.replace("_", " ")}) may not do this: it needs "${permission}".`);
}

/** For route handlers and server actions: 401 when signed out, 403 without the permission. */
export async function requireUser(permission?: Permission): Promise<CurrentUser> {
  // A bearer token replaces the cookie (app/_server/api-token-auth.ts): same checks, narrowed by
  // its scopes. A request that names the Bearer scheme never falls back to the cookie, because
  // the cross-site rule (lib/http/cross-site.ts) exempts exactly those requests.
  const bearer = await currentBearer();
  if (bearer !== null) {
    const tokenUser = await authenticateBearer(bearer, await requestAddress());
    noteUser(tokenUser.id);
    if (permission && !actorCan(tokenUser, permission)) {
      throw new AppError("forbidden", `This API token may not do this: it needs "${permission}", which its scopes or its creator's role do not give.`);
    }
    return tokenUser;
  }
  const user = await getCurrentUser();
  if (!user) throw new AppError("unauthenticated", "Sign in to continue.");
  noteUser(user.id);
  if (permission && !can(user.role, permission)) throw forbidden(user.role, permission);
  await renewIfDue();
  return user;
}

/** For pages: sends a signed-out visitor to sign in and back; a role without access gets a 403 page. */
export async function requirePageUser(permission?: Permission): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) {
    const h = await headers();
    const back = safeNextPath(h.get("x-hearth-path")) || "/";
    redirect(`/sign-in?next=${encodeURIComponent(back)}`);
  }
  noteUser(user.id);
  if (permission && !can(user.role, permission)) redirect(`/forbidden?need=${encodeURIComponent(permission)}`);
  return user;
}
