import { NextResponse, type NextRequest } from "next/server";
import { getIronSession } from "iron-session";
import { unsealSession } from "@/lib/auth/seal-cache";
import { SESSION_COOKIE, SESSION_IDLE_SECONDS, renewalDue, sessionIsLive, type SessionData } from "@/lib/auth/session-config";

function isHttps(req: NextRequest) {
  const proto = req.headers.get("x-forwarded-proto");
  return proto ? proto.split(",")[0].trim() === "https" : req.nextUrl.protocol === "https:";
}

/**
 * Optimistic only: tells pages where the visitor was (for the way back after sign-in) and slides
 * the session's idle lifetime. Every page and handler still checks the user itself. API routes
 * are left out: they renew in requireUser, and skipping the proxy halves a poll's cost.
 */
export async function proxy(req: NextRequest) {
  const path = req.nextUrl.pathname + req.nextUrl.search;
  const forwarded = new Headers(req.headers);
  forwarded.set("x-hearth-path", path);
  const res = NextResponse.next({ request: { headers: forwarded } });

  const secret = process.env.SESSION_SECRET;
  if (!secret || secret.length < 32 || !req.cookies.has(SESSION_COOKIE)) return res;
  try {
    // The cached read first: the cookie is re-sealed only when a live session's renewal is due.
    const seen = await unsealSession(req.cookies.get(SESSION_COOKIE)!.value, secret);
    const now = Date.now();
    if (!sessionIsLive(seen, null, now) || !renewalDue(seen, now)) return res;
    const session = await getIronSession<SessionData>(req, res, {
      password: secret,
      cookieName: SESSION_COOKIE,
      ttl: SESSION_IDLE_SECONDS,
      cookieOptions: { httpOnly: true, sameSite: "lax", secure: isHttps(req), path: "/" },
    });
    session.seenAt = now;
    await session.save();
  } catch {
    // a tampered cookie is simply not renewed; the page treats it as signed out
  }
  return res;
}

export const config = {
  matcher: ["/((?!api/|_next/static|_next/image|favicon.ico|fonts/).*)"],
};
