import { readFileSync, readdirSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { COMPILE_HINT, STATIC_PREFIX } from "@/app/_server/static-assets";
import { appUrl } from "../helpers/browser";

// The running app (scripts/serve.ts) answers the build's static files itself, from memory
// (app/_server/static-assets.ts): what a page asks for must be the build's own bytes, scripts
// behind V8's compile hint.

describe("static files through the running app", () => {
  it("serves a page's scripts with the bytes of the build on disk", async () => {
    const html = await (await fetch(`${appUrl()}/sign-in`)).text();
    const srcs = [...html.matchAll(/src="(\/_next\/static\/chunks\/[^"]+\.js)"/g)].map((m) => m[1]);
    expect(srcs.length).toBeGreaterThan(2);
    const distDir = process.env.NEXT_DIST_DIR ?? ".next";
    const onDisk = new Set(readdirSync(path.join(distDir, "static", "chunks")));
    let compared = 0;
    for (const src of srcs) {
      const name = src.slice(`${STATIC_PREFIX}chunks/`.length);
      expect(onDisk.has(name), name).toBe(true);
      const r = await fetch(`${appUrl()}${src}`, { headers: { "accept-encoding": "gzip" } });
      expect(r.status).toBe(200);
      expect(r.headers.get("cache-control")).toBe("public, max-age=31536000, immutable");
      // fetch undoes the gzip coding; what arrives must be the file itself behind V8's compile hint.
      const file = readFileSync(path.join(distDir, "static", "chunks", name));
      expect(Buffer.from(await r.arrayBuffer()).equals(Buffer.concat([COMPILE_HINT, file]))).toBe(true);
      compared++;
    }
    expect(compared).toBe(srcs.length);
  });
});
