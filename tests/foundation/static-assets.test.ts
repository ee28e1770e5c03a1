import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from "node:fs";
import http from "node:http";
import type { AddressInfo } from "node:net";
import os from "node:os";
import path from "node:path";
import { gunzipSync } from "node:zlib";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { COMPILE_HINT, STATIC_PREFIX, StaticAssets, etagMatches } from "@/app/_server/static-assets";
import { rawRequest } from "../helpers/raw-request";

// The build's hashed static files answered from memory (app/_server/static-assets.ts): the same
// bytes as on disk, gzip only when asked for (RFC 9110 §12.5.3), If-None-Match (§13.1.2), HEAD,
// and nothing outside the folder. An in-process server with a fallback that only says
// "deferred" shows which requests are left to Next.js.

const DEFERRED = 599;
let tmp = "";
let staticDir = "";
let assets: StaticAssets;
let server: http.Server;
let base = "";

const script = "export const floor = " + JSON.stringify(Array.from({ length: 400 }, (_, i) => ({ lane: i % 28, label: `booking ${i}` }))) + ";\n";
/** A script as served: V8's compile hint on the first line, then the file. */
const served = (text: string) => COMPILE_HINT.toString("utf8") + text;

const get = (urlPath: string, headers: Record<string, string> = {}, method = "GET") => rawRequest(base, urlPath, headers, method);

beforeAll(async () => {
  tmp = mkdtempSync(path.join(os.tmpdir(), "hearth-static-"));
  staticDir = path.join(tmp, "static");
  mkdirSync(path.join(staticDir, "chunks"), { recursive: true });
  mkdirSync(path.join(staticDir, "media"), { recursive: true });
  writeFileSync(path.join(staticDir, "chunks", "floor-3f2a.js"), script);
  writeFileSync(path.join(staticDir, "chunks", "tiny.js"), "1;\n");
  writeFileSync(path.join(staticDir, "chunks", "site 1.css"), "body{color:#222}\n".repeat(200));
  writeFileSync(path.join(staticDir, "media", "face.woff2"), Buffer.alloc(4096, 7));
  writeFileSync(path.join(staticDir, "chunks", "notes.exe"), "not served");
  writeFileSync(path.join(tmp, "secret.txt"), "outside the static folder");
  assets = new StaticAssets(staticDir);
  server = http.createServer((req, res) => {
    assets
      .answer(req, res)
      .then((answered) => {
        if (!answered) res.writeHead(DEFERRED).end();
      })
      .catch(() => res.writeHead(500).end());
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
});

afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
  rmSync(tmp, { recursive: true, force: true });
});

describe("static files from memory", () => {
  it("sends the file's bytes gzipped when the client takes gzip, as Next.js would head them", async () => {
    const r = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, { "accept-encoding": "gzip, deflate, br, zstd" });
    expect(r.status).toBe(200);
    expect(r.headers["content-encoding"]).toBe("gzip");
    expect(gunzipSync(r.bytes).toString("utf8")).toBe(served(script));
    expect(r.bytes.length).toBeLessThan(Buffer.byteLength(script) / 3);
    expect(Number(r.headers["content-length"])).toBe(r.bytes.length);
    expect(r.headers["content-type"]).toBe("application/javascript; charset=UTF-8");
    expect(r.headers["cache-control"]).toBe("public, max-age=31536000, immutable");
    expect(r.headers.vary).toBe("Accept-Encoding");
    expect(r.headers.etag).toMatch(/^"[A-Za-z0-9_-]+"$/);
  });

  it("sends plain bytes without Accept-Encoding, or when gzip is refused", async () => {
    const cases: Record<string, string>[] = [{}, { "accept-encoding": "br;q=1, gzip;q=0" }, { "accept-encoding": "identity" }];
    for (const headers of cases) {
      const r = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, headers);
      expect(r.status).toBe(200);
      expect(r.headers["content-encoding"]).toBeUndefined();
      expect(r.bytes.toString("utf8")).toBe(served(script));
    }
  });

  it("answers a matching If-None-Match with 304 and no body, and a stale one with the file", async () => {
    const first = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`);
    const etag = String(first.headers.etag);
    for (const inm of [etag, `W/${etag}`, `"other", ${etag}`, "*"]) {
      const r = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, { "if-none-match": inm });
      expect(r.status, inm).toBe(304);
      expect(r.bytes.length).toBe(0);
      expect(r.headers.etag).toBe(etag);
    }
    const stale = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, { "if-none-match": '"an-older-build"' });
    expect(stale.status).toBe(200);
    expect(stale.bytes.toString("utf8")).toBe(served(script));
  });

  it("answers HEAD with the headers alone", async () => {
    const r = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, { "accept-encoding": "gzip" }, "HEAD");
    expect(r.status).toBe(200);
    expect(r.bytes.length).toBe(0);
    expect(r.headers["content-encoding"]).toBe("gzip");
    expect(Number(r.headers["content-length"])).toBeGreaterThan(0);
  });

  it("starts every script with V8's compile hint (a comment to any other engine)", async () => {
    expect(COMPILE_HINT.toString()).toBe("//# allFunctionsCalledOnLoad\n");
    const r = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`);
    expect(r.bytes.toString("utf8").split("\n")[0]).toBe("//# allFunctionsCalledOnLoad");
    // Still the same program: the hint is a line comment, the file follows unchanged.
    expect(r.bytes.subarray(COMPILE_HINT.length).toString("utf8")).toBe(script);
    const css = await get(`${STATIC_PREFIX}chunks/site%201.css`);
    expect(css.bytes.toString("utf8").startsWith("body{")).toBe(true);
  });

  it("leaves fonts and very small files uncompressed, and decodes names", async () => {
    const font = await get(`${STATIC_PREFIX}media/face.woff2`, { "accept-encoding": "gzip" });
    expect(font.headers["content-type"]).toBe("font/woff2");
    expect(font.headers["content-encoding"]).toBeUndefined();
    expect(font.bytes.equals(Buffer.alloc(4096, 7))).toBe(true);
    const tiny = await get(`${STATIC_PREFIX}chunks/tiny.js`, { "accept-encoding": "gzip" });
    expect(tiny.headers["content-encoding"]).toBeUndefined();
    expect(tiny.bytes.toString()).toBe(served("1;\n"));
    const css = await get(`${STATIC_PREFIX}chunks/site%201.css`, { "accept-encoding": "gzip" });
    expect(css.headers["content-type"]).toBe("text/css; charset=UTF-8");
    expect(gunzipSync(css.bytes).toString()).toBe("body{color:#222}\n".repeat(200));
  });

  it("leaves to Next.js whatever is not a known file inside the folder", async () => {
    for (const p of [
      `${STATIC_PREFIX}../secret.txt`,
      `${STATIC_PREFIX}chunks/../../secret.txt`,
      `${STATIC_PREFIX}%2e%2e/secret.txt`,
      `${STATIC_PREFIX}chunks%2f..%2f..%2fsecret.txt`,
      `${STATIC_PREFIX}..%5csecret.txt`,
      `${STATIC_PREFIX}chunks/floor-3f2a.js%00.css`,
      `${STATIC_PREFIX}%E0%A4%A`,
      `${STATIC_PREFIX}`,
      `${STATIC_PREFIX}chunks/missing.js`,
      `${STATIC_PREFIX}chunks/notes.exe`,
      "/_next/data/x.json",
      "/floor",
    ]) {
      const r = await get(p);
      expect(r.status, p).toBe(DEFERRED);
    }
    const post = await get(`${STATIC_PREFIX}chunks/floor-3f2a.js`, {}, "POST");
    expect(post.status).toBe(DEFERRED);
  });

  it("keeps one copy of a file however its name is spelled in the address", async () => {
    const plain = await assets.asset(`${STATIC_PREFIX}chunks/floor-3f2a.js`);
    const escaped = await assets.asset(`${STATIC_PREFIX}chunks/%66loor-3f2a.js`);
    const dotted = await assets.asset(`${STATIC_PREFIX}media/../chunks/floor-3f2a.js`);
    expect(plain).not.toBeNull();
    expect(escaped).toBe(plain);
    expect(dotted).toBe(plain);
  });

  it("serves a file that appears after a request missed it", async () => {
    expect((await get(`${STATIC_PREFIX}chunks/late.js`)).status).toBe(DEFERRED);
    writeFileSync(path.join(staticDir, "chunks", "late.js"), "late();\n");
    await new Promise((r) => setTimeout(r, 10));
    const r = await get(`${STATIC_PREFIX}chunks/late.js`);
    expect(r.status).toBe(200);
    expect(r.bytes.toString()).toBe(served("late();\n"));
  });

  it("preloads every servable file", async () => {
    const fresh = new StaticAssets(staticDir);
    // floor-3f2a.js, tiny.js, site 1.css, face.woff2, late.js (notes.exe has no known type)
    expect(await fresh.warm()).toBe(5);
  });
});

describe("etagMatches (RFC 9110 §13.1.2, weak comparison)", () => {
  it("matches the examples of the section", () => {
    expect(etagMatches('"xyzzy"', '"xyzzy"')).toBe(true);
    expect(etagMatches('"xyzzy", "r2d2xxxx", "c3piozzzz"', '"r2d2xxxx"')).toBe(true);
    expect(etagMatches('W/"xyzzy"', '"xyzzy"')).toBe(true);
    expect(etagMatches("*", '"anything"')).toBe(true);
    expect(etagMatches('"xyzzy"', '"r2d2"')).toBe(false);
    expect(etagMatches(undefined, '"xyzzy"')).toBe(false);
    expect(etagMatches("", '"xyzzy"')).toBe(false);
  });
});
