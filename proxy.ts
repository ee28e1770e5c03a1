import { NextResponse, type NextRequest } from "next/server";
import { getIronSession } from "iron-session";
import { unsealSession } from "@/lib/auth/seal-cache";
import { SESSION_COOKIE, SESSION_IDLE_SECONDS, renewalDue, sessionIsLive, type SessionData } from "@/lib/auth/session-config";
import { contentSecurityPolicy } from "@/lib/http/security-headers";

function isHttps(req: NextRequest) {
  const proto = req.headers.get("x-forwarded-proto");
  return proto ? proto.split(",")[0].trim() === "https" : req.nextUrl.protocol === "https:";
}

/**
 * Two jobs, before any page runs (cross-site requests are refused earlier, by the web server,
 * scripts/serve.ts: a proxy would buffer every upload's body to run at all):
 * - gives each page a fresh nonce and its Content-Security-Policy (Next.js reads the nonce back
 *   from the request's policy header and puts it on its own scripts);
 * - optimistically: tells pages where the visitor was (for the way back after sign-in) and
 *   slides the session's idle lifetime. Every page and handler still checks the user itself.
 */
export async function proxy(req: NextRequest) {
  const nonce = btoa(crypto.randomUUID());
  const csp = contentSecurityPolicy(nonce, { dev: process.env.NODE_ENV === "development" });
  const path = req.nextUrl.pathname + req.nextUrl.search;
  const forwarded = new Headers(req.headers);
  forwarded.set("x-hearth-path", path);
  forwarded.set("x-nonce", nonce);
  forwarded.set("content-security-policy", csp);
  const res = NextResponse.next({ request: { headers: forwarded } });
  res.headers.set("content-security-policy", csp);

  const secret = process.env.SESSION_SECRET;
  if (!secret || secret.length < 32 || !req.cookies.has(SESSION_COOKIE)) return res;
  try {
    // The cached read first: the cookie is re-sealed only when a live session's renewal is due.
    const seen = await unsealSession(req.cookies.get(SESSION_COOKIE)!.value, secret);
    const now = Date.now();
    if (!sessionIsLive(seen, null, now, "unchecked") || !renewalDue(seen, now)) return res;
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
