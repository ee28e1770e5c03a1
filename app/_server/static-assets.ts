// The build's static files (/_next/static/…) answered from memory by the web server
// (scripts/serve.ts). Their names carry a content hash, so each one never changes while a build
// is served: it is read and gzipped once, then every page load gets the same bytes. Next.js's
// own file serving stats, streams and compresses every request anew; on a two-core shop server
// the floor's eleven scripts took 110–200 ms that way, time the page spends waiting to start.
// Scripts get V8's compile hint on their first line (COMPILE_HINT). What is not here (a missing
// file, a path outside the folder, another method) goes to Next.js.
import { createHash } from "node:crypto";
import { promises as fs } from "node:fs";
import type { IncomingMessage, ServerResponse } from "node:http";
import path from "node:path";
import { promisify } from "node:util";
import { gzip as gzipCallback } from "node:zlib";
import { acceptsGzip } from "@/lib/http/accept-encoding";

const gzip = promisify(gzipCallback);

export const STATIC_PREFIX = "/_next/static/";

/** Next.js's own header for these files: hashed names, cached for a year. */
const CACHE_CONTROL = "public, max-age=31536000, immutable";

const TYPES: Record<string, { type: string; compress: boolean; script?: true }> = {
  ".js": { type: "application/javascript; charset=UTF-8", compress: true, script: true },
  ".mjs": { type: "application/javascript; charset=UTF-8", compress: true, script: true },
  ".css": { type: "text/css; charset=UTF-8", compress: true },
  ".json": { type: "application/json; charset=UTF-8", compress: true },
  ".map": { type: "application/json; charset=UTF-8", compress: true },
  ".txt": { type: "text/plain; charset=UTF-8", compress: true },
  ".svg": { type: "image/svg+xml", compress: true },
  ".woff2": { type: "font/woff2", compress: false },
  ".woff": { type: "font/woff", compress: false },
  ".png": { type: "image/png", compress: false },
  ".jpg": { type: "image/jpeg", compress: false },
  ".ico": { type: "image/x-icon", compress: false },
};

/**
 * V8's explicit compile hint (Chrome 136 and later; "Explicit JavaScript Compile Hints", W3C TAG
 * design review 947; v8.dev/blog/explicit-compile-hints): a first-line comment that asks the
 * engine to compile every function of the script on the thread that streams it in, instead of
 * lazily on the main thread at each function's first call. The build's chunks are the scripts a
 * page runs as it starts (React, the router, FullCalendar for the floor), so nearly all of their
 * functions are called at once; measured on the floor, the main thread saved about 0.2 s. Other
 * engines read it as a comment. A chunk loaded later on demand (the 3-D preview) is compiled
 * whole as well, off the main thread.
 */
export const COMPILE_HINT = Buffer.from("//# allFunctionsCalledOnLoad\n");

/** Below this a gzip member saves nothing worth the header. */
const MIN_COMPRESS_BYTES = 1024;

export type StaticAsset = { raw: Buffer; gzip: Buffer | null; type: string; etag: string };

export class StaticAssets {
  private readonly root: string;
  private readonly cache = new Map<string, Promise<StaticAsset | null>>();

  /** `dir` is the build's static folder: `<distDir>/static`. */
  constructor(dir: string) {
    this.root = path.resolve(dir);
  }

  /** The file for a request path under STATIC_PREFIX, or null (unknown type, outside, missing). */
  asset(urlPath: string): Promise<StaticAsset | null> {
    const file = this.fileFor(urlPath);
    return file ? this.entry(file) : Promise.resolve(null);
  }

  /** Keyed by the file, not the address: "%61.js" and "a.js" share one entry. */
  private entry(file: string): Promise<StaticAsset | null> {
    let cached = this.cache.get(file);
    if (!cached) {
      cached = this.load(file);
      this.cache.set(file, cached);
      // A file that is not there may be written later (it never is for a build), and a miss
      // or a failed read is not kept.
      const forget = () => void this.cache.delete(file);
      cached.then((a) => (a ? undefined : forget()), forget);
    }
    return cached;
  }

  private async load(file: string): Promise<StaticAsset | null> {
    const kind = TYPES[path.extname(file).toLowerCase()];
    if (!kind) return null;
    let raw: Buffer;
    try {
      raw = await fs.readFile(file);
    } catch {
      return null;
    }
    if (kind.script) raw = Buffer.concat([COMPILE_HINT, raw]);
    const zipped = kind.compress && raw.length >= MIN_COMPRESS_BYTES ? await gzip(raw, { level: 9 }) : null;
    const etag = `"${createHash("sha1").update(raw).digest("base64url")}"`;
    return { raw, gzip: zipped && zipped.length < raw.length ? zipped : null, type: kind.type, etag };
  }

  /** The file a request path names, or null when it is malformed or leaves the folder. */
  fileFor(urlPath: string): string | null {
    if (!urlPath.startsWith(STATIC_PREFIX)) return null;
    let rel: string;
    try {
      rel = decodeURIComponent(urlPath.slice(STATIC_PREFIX.length));
    } catch {
      return null;
    }
    if (!rel || rel.includes("\0") || rel.includes("\\")) return null;
    const file = path.resolve(this.root, rel);
    return file.startsWith(this.root + path.sep) ? file : null;
  }

  /** Reads and compresses every file now, so that the first page load finds them ready. */
  async warm(): Promise<number> {
    let n = 0;
    const walk = async (dir: string): Promise<void> => {
      const entries = await fs.readdir(dir, { withFileTypes: true }).catch(() => []);
      for (const e of entries) {
        const full = path.join(dir, e.name);
        if (e.isDirectory()) await walk(full);
        else if (e.isFile() && (await this.entry(full))) n++;
      }
    };
    await walk(this.root);
    return n;
  }

  /** True when the response was sent; false leaves the request untouched for Next.js. */
  async answer(req: IncomingMessage, res: ServerResponse): Promise<boolean> {
    if ((req.method !== "GET" && req.method !== "HEAD") || !req.url?.startsWith(STATIC_PREFIX)) return false;
    const q = req.url.indexOf("?");
    const asset = await this.asset(q < 0 ? req.url : req.url.slice(0, q));
    if (!asset) return false;

    const headers: Record<string, string> = { "content-type": asset.type, "cache-control": CACHE_CONTROL, etag: asset.etag };
    if (asset.gzip) headers.vary = "Accept-Encoding";
    if (etagMatches(req.headers["if-none-match"], asset.etag)) {
      res.writeHead(304, headers);
      res.end();
      return true;
    }
    const zipped = asset.gzip && acceptsGzip(req.headers["accept-encoding"]);
    const body = zipped ? asset.gzip! : asset.raw;
    if (zipped) headers["content-encoding"] = "gzip";
    headers["content-length"] = String(body.length);
    res.writeHead(200, headers);
    res.end(req.method === "HEAD" ? undefined : body);
    return true;
  }
}

/** If-None-Match (RFC 9110 §13.1.2): "*" or any listed tag, compared weakly. */
export function etagMatches(header: string | undefined, etag: string): boolean {
  if (!header) return false;
  if (header.trim() === "*") return true;
  const bare = etag.replace(/^W\//, "");
  return header.split(",").some((t) => t.trim().replace(/^W\//, "") === bare);
}
