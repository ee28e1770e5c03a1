import type { IncomingMessage, ServerResponse } from "node:http";
import { logger } from "@/adapters/log/logger";
import { requestIdFrom, runWithRequest, type RequestContext } from "./request-context";

/**
 * Gives a request its id (a sane incoming X-Request-Id, else a new one), returns it as the
 * X-Request-Id response header, and writes one JSON line when the response ends or the client
 * goes: method, path (no query string: it may carry tokens), status, ms, request id, user id.
 */
export function withRequestLog(req: IncomingMessage, res: ServerResponse, next: () => void): void {
  const ctx: RequestContext = { id: requestIdFrom(req.headers["x-request-id"]), userId: null };
  req.headers["x-request-id"] = ctx.id;
  res.setHeader("x-request-id", ctx.id);
  const started = performance.now();
  let logged = false;
  const done = () => {
    if (logged) return;
    logged = true;
    const status = res.writableFinished ? res.statusCode : 499;
    const line = {
      req_id: ctx.id,
      method: req.method,
      path: (req.url ?? "/").split("?")[0],
      status,
      ms: Math.round((performance.now() - started) * 10) / 10,
      user_id: ctx.userId,
    };
    if (status >= 500) logger.error(line, "request");
    else logger.info(line, "request");
  };
  res.once("finish", done);
  res.once("close", done);
  runWithRequest(ctx, next);
}
