// Cross-site request refusal for every state-changing request (scripts/serve.ts). A browser sends Origin
// with every POST, PUT, PATCH and DELETE, and Sec-Fetch-Site with every request (Fetch Metadata,
// W3C); a form or fetch from another site carries that site's origin. SameSite=Lax cookies
// already stop most of it, but not a same-site sibling host nor an older browser, and a
// text/plain "simple request" needs no preflight. OWASP Cross-Site Request Forgery Prevention
// Cheat Sheet: "Verifying Origin With Standard Headers" and "Fetch Metadata headers".

import { bearerToken } from "@/lib/auth/api-scopes";

export const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

type HeaderSource = { get(name: string): string | null };

/**
 * Requests authenticated by a bearer token (API tokens, lib/auth/api-scopes.ts) carry no ambient
 * credential a foreign page could borrow, so the Origin rule does not apply to them. A browser
 * cannot add an Authorization header cross-site without a CORS preflight, which Hearth never
 * grants. This is the one test for "a bearer request": requireUser (app/_server/session.ts)
 * authenticates every request it exempts by its token alone, never by the cookie beside it.
 */
export function isBearerTokenRequest(headers: HeaderSource): boolean {
  return bearerToken(headers.get("authorization")) !== null;
}

/** The request's own host as the browser addressed it (a reverse proxy's X-Forwarded-Host first). */
function requestHost(headers: HeaderSource): string | null {
  const forwarded = headers.get("x-forwarded-host")?.split(",")[0]?.trim();
  return (forwarded || headers.get("host") || "").toLowerCase() || null;
}

/**
 * Why a request must be refused as cross-site, or null to let it through. `appOrigin` is the
 * configured APP_URL's origin; the request's own Host is accepted too (the same rule Next.js
 * applies to server actions).
 */
export function crossSiteRefusal(method: string, headers: HeaderSource, appOrigin: string | null): string | null {
  if (SAFE_METHODS.has(method.toUpperCase())) return null;
  if (isBearerTokenRequest(headers)) return null;
  if ((headers.get("sec-fetch-site") ?? "").toLowerCase() === "cross-site") return "The request came from another site.";
  const origin = headers.get("origin");
  if (origin === null) return null; // not a browser (curl, a script): nothing ambient to borrow beyond its own cookie
  if (origin === "null") return "The request came from a page without an origin.";
  let host: string;
  try {
    const parsed = new URL(origin);
    if (appOrigin && parsed.origin === appOrigin) return null;
    host = parsed.host.toLowerCase();
  } catch {
    return "The request's Origin header is not an address.";
  }
  return host === requestHost(headers) ? null : `The request came from another site (${origin}).`;
}
