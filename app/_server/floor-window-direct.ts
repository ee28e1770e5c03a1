// GET /api/floor answered by the web server itself (scripts/serve.ts), before Next.js sees the
// request. Every open floor polls its window every few seconds, and on a small shop server the
// framework's per-request work costs more than the answer: the window comes from a cache, so
// the rest is a cookie, one query and a write. Only the plain case is answered here: a well-formed
// window and a session that app/_server/floor-access.ts allows (the rule the route handler uses
// too) and that is not yet due for renewal. Anything else (signed out, refused, bad window, a
// cookie to renew, a bearer token, an error) returns false and goes to the route handler, app/api/floor/route.ts,
// which answers it in full.
import type { IncomingMessage, ServerResponse } from "node:http";
import { parse as parseCookies } from "cookie";
import type { Database } from "@/db/client";
import { floorWindowBody } from "@/db/floor/reads";
import { acceptsGzip } from "@/lib/http/accept-encoding";
import { SESSION_COOKIE } from "@/lib/auth/session-config";
import { authorizeFloorRead } from "@/app/_server/floor-access";
import { floorWindowSchema } from "@/lib/floor/schemas";

export const FLOOR_WINDOW_PATH = "/api/floor";

/** True when the response was sent; false leaves the request untouched for Next.js. */
export async function answerFloorWindow(req: IncomingMessage, res: ServerResponse, db: Database, secret: string, now = Date.now()): Promise<boolean> {
  if (req.method !== "GET" || !req.url) return false;
  const q = req.url.indexOf("?");
  if ((q < 0 ? req.url : req.url.slice(0, q)) !== FLOOR_WINDOW_PATH) return false;
  // Only cookies are read here: a request with any Authorization header (an API token) is the
  // route handler's, which authenticates it through requireUser like every other route.
  if (req.headers.authorization !== undefined) return false;

  const w = floorWindowSchema.safeParse(Object.fromEntries(new URLSearchParams(q < 0 ? "" : req.url.slice(q + 1))));
  if (!w.success) return false;

  const seal = req.headers.cookie ? parseCookies(req.headers.cookie)[SESSION_COOKIE] : undefined;
  const access = await authorizeFloorRead(db, seal, secret, now);
  if (access.kind !== "allowed" || access.renewalDue) return false;
  const stamp = access.stamp;

  const { bytes, headers } = (await floorWindowBody(db, w.data, stamp)).encoded(acceptsGzip(req.headers["accept-encoding"]));
  res.writeHead(200, headers);
  res.end(bytes);
  return true;
}
