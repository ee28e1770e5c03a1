// The shared reads (app/_server/shared-reads.ts: the floor's window, the batching board, the
// unscheduled builds, a unit's trace) answered by the web server itself (scripts/serve.ts), before
// Next.js sees the request. After each change every open page asks again, and on a small shop
// server the framework's per-request work (and its gzip of every response) costs more than the
// answer: the body comes from a cache, already gzipped, so the rest is a cookie, one query and a
// write, or a 304 when the browser already holds that body. Only the plain case is answered
// here: a well-formed request and a session that app/_server/floor-access.ts allows (the rule the
// route handlers use too) and that is not yet due for renewal. Anything else (signed out,
// refused, a malformed window or id, a cookie to renew, a bearer token, an error such as an
// unknown unit) returns false and goes to the route handler, which answers it in full.
import type { IncomingMessage, ServerResponse } from "node:http";
import { parse as parseCookies } from "cookie";
import type { Database } from "@/db/client";
import { acceptsGzip } from "@/lib/http/accept-encoding";
import { SESSION_COOKIE } from "@/lib/auth/session-config";
import { authorizeSharedRead } from "@/app/_server/floor-access";
import { matchSharedRead } from "@/app/_server/shared-reads";

/** True when the response was sent; false leaves the request untouched for Next.js. */
export async function answerSharedRead(req: IncomingMessage, res: ServerResponse, db: Database, secret: string, now = Date.now()): Promise<boolean> {
  if (req.method !== "GET" || !req.url) return false;
  const q = req.url.indexOf("?");
  const read = matchSharedRead(q < 0 ? req.url : req.url.slice(0, q), new URLSearchParams(q < 0 ? "" : req.url.slice(q + 1)));
  if (!read) return false;
  // Only cookies are read here: a request with any Authorization header (an API token) is the
  // route handler's, which authenticates it through requireUser like every other route.
  if (req.headers.authorization !== undefined) return false;

  const seal = req.headers.cookie ? parseCookies(req.headers.cookie)[SESSION_COOKIE] : undefined;
  const access = await authorizeSharedRead(db, read.stamp, seal, secret, now);
  if (access.kind !== "allowed" || access.renewalDue) return false;

  const body = await read.body(db, access.stamp);
  if (body.notModified(req.headers["if-none-match"])) {
    res.writeHead(304, body.notModifiedHeaders);
    res.end();
    return true;
  }
  const { bytes, headers } = body.encoded(acceptsGzip(req.headers["accept-encoding"]));
  res.writeHead(200, headers);
  res.end(bytes);
  return true;
}

/** The floor's window alone (the direct path as it began; its tests call it by this name). */
export function answerFloorWindow(req: IncomingMessage, res: ServerResponse, db: Database, secret: string, now = Date.now()): Promise<boolean> {
  const path = req.url?.split("?")[0];
  return path === "/api/floor" ? answerSharedRead(req, res, db, secret, now) : Promise.resolve(false);
}
