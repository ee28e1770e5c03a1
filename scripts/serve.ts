// The web server of a built Hearth (`npm run serve`, `npm start`, the tests and the benchmarks):
// Next.js's request handler behind Node's own HTTP server, the framework's "custom server"
// (https://nextjs.org/docs/app/guides/custom-server). It answers two kinds of request before the
// framework's per-request work: the shared reads that every open page asks for again after each
// change it hears of (the floor's window, the board, the unscheduled builds, a unit's trace), from
// their caches (app/_server/shared-read-direct.ts), and the build's hashed static files from memory, gzipped
// once (app/_server/static-assets.ts). Everything else is Next.js's, unchanged.
// PORT (3000) and HOSTNAME (127.0.0.1) say where it listens; the build is NEXT_DIST_DIR (.next).
// Every answer names the instance in X-Hearth-Instance (HEARTH_INSTANCE, else host:port), so
// that behind a proxy one can see which instance answered.
import http from "node:http";
import path from "node:path";
import { fileURLToPath } from "node:url";
import next from "next";
import { closeDb, getDb } from "@/db/client";
import { answerSharedRead } from "@/app/_server/shared-read-direct";
import { STATIC_PREFIX, StaticAssets } from "@/app/_server/static-assets";
import { PEER_HEADER } from "@/lib/http/client-address";
import { DECLARED_LENGTH_HEADER, declaredLength } from "@/lib/http/declared-length";
import { baseSecurityHeaders } from "@/lib/http/security-headers";
import { pathDecodes } from "@/lib/http/request-target";
import { crossSiteRefusal } from "@/lib/http/cross-site";
import { liveHub } from "@/app/_server/live-hub";
import { withRequestLog } from "@/app/_server/request-log";
import { startComputeThreads } from "@/db/compute/threads";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
// Where the compute threads find their entry (db/compute/threads.ts), whatever the working directory.
process.env.HEARTH_ROOT ??= root;
const port = Number(process.env.PORT ?? 3000);
const hostname = process.env.HOSTNAME ?? "127.0.0.1";
const instance = process.env.HEARTH_INSTANCE || `${hostname}:${port}`;
// How long a stop waits for requests in flight before it closes their connections.
const graceMs = Number(process.env.HEARTH_STOP_GRACE_MS ?? 10_000);
// How long an answer given before the request's body was read keeps reading (and dropping) it.
const LINGER_MS = 500;
const LINGER_MAX_MS = 30_000;

/**
 * Answers that must end their connection: one given before the request's body was read to its
 * end (a 413 for an upload over the limit, a 401 before the upload) — otherwise Node reads and
 * discards the rest of the body and keeps the connection, and a client that stopped sending
 * waits on it until the server's timeouts — and any answer while the server stops (which
 * says "Connection: close"). After an unread body the connection goes once the rest has been
 * read, or LINGER_MS after the answer.
 */
function closeWhenDue(req: http.IncomingMessage, res: http.ServerResponse, stopping: () => boolean) {
  const writeHead = res.writeHead;
  res.writeHead = function (this: http.ServerResponse, ...args: Parameters<typeof writeHead>) {
    const hasBody = req.headers["transfer-encoding"] !== undefined || Number(req.headers["content-length"] ?? 0) > 0;
    if (hasBody && !req.complete) {
      // A lingering close, as nginx does. The answer says "Connection: close" so that no client
      // sends another request on this connection; when the answer is out, Node would close at
      // once and reset a client still sending its body (EPIPE before it reads the answer). So
      // the close here sends FIN only and goes on reading and dropping until the client hangs up
      // or LINGER_MS pass (a client that stopped sending is cut off then, not left hanging).
      // The socket is the answer's: Next.js may already have destroyed the request stream (and
      // with it req.socket) when the handler answered without reading the body.
      const socket = res.socket;
      res.shouldKeepAlive = false;
      if (socket) {
        socket.destroySoon = function lingeringClose(this: typeof socket) {
          this.end();
          // Node's HTTP parser stops reading once the request stream it feeds is gone; take the
          // socket from it and drop what comes, cutting the connection LINGER_MS after the last
          // byte (LINGER_MAX_MS at the most), as nginx's lingering_timeout and lingering_time do.
          const parser = (this as unknown as { parser?: { _consumed?: boolean; unconsume?: () => void } }).parser;
          if (parser?._consumed && parser.unconsume) {
            parser.unconsume();
            parser._consumed = false;
          }
          this.removeAllListeners("data");
          const until = setTimeout(() => this.destroy(), LINGER_MAX_MS);
          until.unref();
          let idle = setTimeout(() => this.destroy(), LINGER_MS);
          idle.unref();
          this.on("data", () => {
            clearTimeout(idle);
            idle = setTimeout(() => this.destroy(), LINGER_MS);
            idle.unref();
          });
          this.once("close", () => {
            clearTimeout(idle);
            clearTimeout(until);
          });
          this.once("end", () => this.destroy());
          this.resume();
        };
      }
    } else if (stopping()) {
      res.shouldKeepAlive = false;
    }
    // A streamed file's length, which Next.js would not pass on (lib/http/declared-length.ts).
    if (res.hasHeader(DECLARED_LENGTH_HEADER)) {
      const length = declaredLength(res.getHeader(DECLARED_LENGTH_HEADER));
      res.removeHeader(DECLARED_LENGTH_HEADER);
      if (length !== null && !res.hasHeader("content-encoding") && !res.hasHeader("transfer-encoding")) res.setHeader("content-length", length);
    }
    return writeHead.apply(this, args);
  } as typeof res.writeHead;
}

async function main() {
  const app = next({ dev: false, dir: root, hostname, port });
  await app.prepare();
  const handle = app.getRequestHandler();
  // HEARTH_STATIC_FROM_MEMORY=0 leaves the static files to Next.js (the floor benchmark measures both).
  const assets = process.env.HEARTH_STATIC_FROM_MEMORY === "0" ? null : new StaticAssets(path.resolve(root, process.env.NEXT_DIST_DIR || ".next", "static"));
  // Without a usable secret nothing can be answered directly; Next.js then reports the set-up error.
  const secret = process.env.SESSION_SECRET && process.env.SESSION_SECRET.length >= 32 ? process.env.SESSION_SECRET : null;

  const securityHeaders = Object.entries(baseSecurityHeaders(process.env.APP_URL));
  const appOrigin = URL.canParse(process.env.APP_URL ?? "") ? new URL(process.env.APP_URL!).origin : null;
  let stopping = false;
  const server = http.createServer((req, res) => withRequestLog(req, res, () => {
    res.setHeader("x-hearth-instance", instance);
    closeWhenDue(req, res, () => stopping);
    // Every answer, direct or Next.js's, carries the security headers; the page's CSP is proxy.ts's.
    for (const [name, value] of securityHeaders) res.setHeader(name, value);
    // The socket's address for app/_server/session.ts, never a value the client sent.
    delete req.headers[PEER_HEADER];
    if (req.socket.remoteAddress) req.headers[PEER_HEADER] = req.socket.remoteAddress;
    // A state-changing request from another site (route handlers and server actions alike) ends
    // here, before Next.js reads its body (lib/http/cross-site.ts).
    const refusal = crossSiteRefusal(req.method ?? "GET", { get: (name) => [req.headers[name] ?? []].flat().join(", ") || null }, appOrigin);
    if (refusal) {
      res.writeHead(403, { "content-type": "application/json" });
      res.end(JSON.stringify({ error: { code: "forbidden", message: `${refusal} Changes are only accepted from Hearth's own pages.` } }));
      return;
    }
    if (req.url && !pathDecodes(req.url)) {
      res.writeHead(400, { "content-type": "application/json" });
      res.end(JSON.stringify({ error: { code: "bad_request", message: "The address contains a malformed %-escape." } }));
      return;
    }
    const direct = assets && req.url?.startsWith(STATIC_PREFIX)
      ? assets.answer(req, res)
      : secret
        ? answerSharedRead(req, res, getDb(), secret)
        : Promise.resolve(false);
    direct
      .catch((err: unknown) => {
        // An error before anything was written (the database, say) is the route handler's to report.
        if (res.headersSent) throw err;
        return false;
      })
      .then((answered) => (answered ? undefined : handle(req, res)))
      .catch((err: unknown) => {
        console.error("[app] request failed", req.method, req.url, err);
        if (!res.headersSent) res.writeHead(500, { "content-type": "text/plain" });
        res.end();
      });
  }));
  // Longer than a reverse proxy's usual idle timeout, so that the proxy closes first.
  server.keepAliveTimeout = 65_000;
  server.headersTimeout = 66_000;
  server.listen(port, hostname, () => console.log(`[app] ready on http://${hostname}:${port}`));
  // Off the request path (the reads and gzip run on libuv's pool): the first page load then
  // finds its scripts ready too.
  void assets?.warm().catch((err: unknown) => console.error("[app] static files not preloaded:", err));
  // Live updates (app/api/events): listening from the start also keeps the floor's window cache
  // in step with changes made by other instances and the worker.
  liveHub().start();
  // The planners' searches run on their own threads, which load their sources now.
  startComputeThreads();

  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    const started = Date.now();
    console.log(`[app] ${signal}: closing`);
    // Open event streams never finish by themselves: end them now, and the browsers reconnect
    // to another instance (or to this one once it is back).
    void liveHub().shutdown();
    // Idle keep-alive connections go now, and each one that falls idle after its answer goes
    // too (the ended streams' connections among them); the server stops as soon as the requests
    // in flight are answered, or after the grace.
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
      const sweep = setInterval(() => server.closeIdleConnections(), 50);
      sweep.unref();
      setTimeout(() => {
        server.closeAllConnections();
        resolve();
      }, graceMs).unref();
    });
    console.log(`[app] connections closed in ${Date.now() - started} ms`);
    await app.close().catch(() => undefined);
    await closeDb().catch(() => undefined);
    process.exit(0);
  };
  process.on("SIGTERM", () => void stop("SIGTERM"));
  process.on("SIGINT", () => void stop("SIGINT"));
}

main().catch((err) => {
  console.error("[app] failed to start:", err);
  process.exit(1);
});
