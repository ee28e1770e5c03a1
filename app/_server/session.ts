import { cache } from "react";
import { cookies, headers } from "next/headers";
import { redirect } from "next/navigation";
import { getIronSession, type SessionOptions } from "iron-session";
import { getDb } from "@/db/client";
import { findActiveUserById, type CurrentUser } from "@/db/users/reads";
import { AppError } from "@/lib/errors";
import { can, type Permission, type Role } from "@/lib/auth/permissions";
import { clientAddress } from "@/lib/auth/throttle";
import { actorCan } from "@/lib/auth/api-scopes";
import { authenticateBearer, currentBearer } from "@/app/_server/api-token-auth";

export type { CurrentUser };

import { SESSION_COOKIE, SESSION_IDLE_SECONDS, renewalDue, sessionIsLive, type SessionData } from "@/lib/auth/session-config";
import { unsealSession } from "@/lib/auth/seal-cache";

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

/** Starts a fresh session for the user (sign-in), or re-issues it after a password change. */
export async function startSession(userId: string, now = Date.now()) {
  const session = await getSession();
  session.userId = userId;
  session.issuedAt = now;
  session.seenAt = now;
  await session.save();
}

export async function endSession() {
  const session = await getSession();
  session.destroy();
}

/** The client's address for throttling and the audit trail (first X-Forwarded-For hop). */
export async function requestAddress(): Promise<string> {
  const h = await headers();
  return clientAddress(h.get("x-forwarded-for"), h.get("x-real-ip"));
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
  const user = await findActiveUserById(getDb(), data.userId!);
  if (!user || !sessionIsLive(data, user.sessions_valid_after)) return null;
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
}

/** The 403 a role without the permission gets from any API. */
export function forbidden(role: Role, permission: Permission): AppError {
  return new AppError("forbidden", `Your role (${role.replace("_", " ")}) may not do this: it needs "${permission}".`);
}

/** For route handlers and server actions: 401 when signed out, 403 without the permission. */
export async function requireUser(permission?: Permission): Promise<CurrentUser> {
  // A bearer token replaces the cookie (app/_server/api-token-auth.ts): same checks, narrowed by its scopes.
  const bearer = await currentBearer();
  if (bearer !== null) {
    const tokenUser = await authenticateBearer(bearer);
    if (permission && !actorCan(tokenUser, permission)) {
      throw new AppError("forbidden", `This API token may not do this: it needs "${permission}", which its scopes or its creator's role do not give.`);
    }
    return tokenUser;
  }
  const user = await getCurrentUser();
  if (!user) throw new AppError("unauthenticated", "Sign in to continue.");
  if (permission && !can(user.role, permission)) throw forbidden(user.role, permission);
  await renewIfDue();
  return user;
}

/** For pages: sends a signed-out visitor to sign in and back; a role without access gets a 403 page. */
export async function requirePageUser(permission?: Permission): Promise<CurrentUser> {
  const user = await getCurrentUser();
  if (!user) {
    const h = await headers();
    const back = h.get("x-hearth-path") ?? "/";
    redirect(`/sign-in?next=${encodeURIComponent(back)}`);
  }
  if (permission && !can(user.role, permission)) redirect(`/forbidden?need=${encodeURIComponent(permission)}`);
  return user;
}
