// The web server of a built Hearth (`npm run serve`, `npm start`, the tests and the benchmarks):
// Next.js's request handler behind Node's own HTTP server, the framework's "custom server"
// (https://nextjs.org/docs/app/guides/custom-server). It answers two kinds of request before the
// framework's per-request work: the floor's window, which every open floor polls, from its
// cache (app/_server/floor-window-direct.ts), and the build's hashed static files from memory, gzipped
// once (app/_server/static-assets.ts). Everything else is Next.js's, unchanged.
// PORT (3000) and HOSTNAME (127.0.0.1) say where it listens; the build is NEXT_DIST_DIR (.next).
import http from "node:http";
import path from "node:path";
import { fileURLToPath } from "node:url";
import next from "next";
import { closeDb, getDb } from "@/db/client";
import { answerFloorWindow } from "@/app/_server/floor-window-direct";
import { STATIC_PREFIX, StaticAssets } from "@/app/_server/static-assets";
import { liveHub } from "@/app/_server/live-hub";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const port = Number(process.env.PORT ?? 3000);
const hostname = process.env.HOSTNAME ?? "127.0.0.1";

async function main() {
  const app = next({ dev: false, dir: root, hostname, port });
  await app.prepare();
  const handle = app.getRequestHandler();
  // HEARTH_STATIC_FROM_MEMORY=0 leaves the static files to Next.js (the floor benchmark measures both).
  const assets = process.env.HEARTH_STATIC_FROM_MEMORY === "0" ? null : new StaticAssets(path.resolve(root, process.env.NEXT_DIST_DIR || ".next", "static"));
  // Without a usable secret nothing can be answered directly; Next.js then reports the set-up error.
  const secret = process.env.SESSION_SECRET && process.env.SESSION_SECRET.length >= 32 ? process.env.SESSION_SECRET : null;

  const server = http.createServer((req, res) => {
    const direct = assets && req.url?.startsWith(STATIC_PREFIX)
      ? assets.answer(req, res)
      : secret
        ? answerFloorWindow(req, res, getDb(), secret)
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
  });
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

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`[app] ${signal}: closing`);
    // Open event streams never finish by themselves: end them now, and the browsers reconnect
    // to another instance (or to this one once it is back).
    const live = liveHub().shutdown();
    // Requests in flight may finish (five seconds at most); idle keep-alive connections go now.
    await new Promise<void>((resolve) => {
      server.close(() => resolve());
      server.closeIdleConnections();
      // The ended streams' connections turn idle a moment later.
      void live.then(() => setTimeout(() => server.closeIdleConnections(), 50));
      setTimeout(() => {
        server.closeAllConnections();
        resolve();
      }, 5_000).unref();
    });
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
