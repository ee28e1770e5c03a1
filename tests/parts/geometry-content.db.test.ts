import { createHash } from "node:crypto";
import http from "node:http";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { testDb } from "../helpers/db";
import { appUrl } from "../helpers/browser";
import { api, DEMO, signIn } from "../helpers/session";
import { boxMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { makeOrder, makePart } from "../floor/fixtures";

// Reading stored geometry back through the running app and its S3 fake: the bytes are streamed
// from the store, arrive unchanged, and a reader who leaves mid-body does not wedge the app.

const { db, close } = testDb();
let tech: string;

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
});
afterAll(async () => {
  await close();
});

const sha256 = (b: Uint8Array) => createHash("sha256").update(b).digest("hex");

/** A binary STL of `triangles` facets (STL binary layout: 80-byte header, uint32 count, 50 bytes a facet), each facet's attribute bytes numbered so no two neighbouring chunks are alike. */
function largeStl(triangles: number): Buffer {
  const facet = writeBinaryStl(boxMesh(10, 10, 10)).subarray(84, 134);
  const out = Buffer.alloc(84 + 50 * triangles);
  out.writeUInt32LE(triangles, 80);
  for (let i = 0; i < triangles; i++) {
    out.set(facet, 84 + i * 50);
    out.writeUInt16LE(i & 0xffff, 84 + i * 50 + 48);
  }
  return out;
}

describe("stored file content", () => {
  it("streams a several-megabyte STL back byte for byte (SHA-256), with its length; a reader aborted after the first chunk leaves the app answering", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "17-4PH", size: [40, 30, 20] });
    const stl = largeStl(120_000); // 6 000 084 bytes
    const up = await api(`/api/parts/${part.id}/geometry`, {
      method: "POST",
      cookie: tech,
      body: stl,
      headers: { "content-type": "application/octet-stream", "x-filename": "large.stl" },
    });
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    const url = `${appUrl()}/api/files/${up.body.file.id}/content`;

    const res = await fetch(url, { headers: { cookie: tech } });
    expect(res.status).toBe(200);
    expect(res.headers.get("content-length")).toBe(String(stl.byteLength));
    const got = new Uint8Array(await res.arrayBuffer());
    expect(got.byteLength).toBe(stl.byteLength);
    expect(sha256(got)).toBe(sha256(stl));

    // Leave after the first chunk, three times over: each time the next read is answered whole.
    for (let i = 0; i < 3; i++) {
      const firstChunk = await new Promise<number>((resolve, reject) => {
        const req = http.get(url, { headers: { cookie: tech } }, (r) => {
          r.once("data", (d: Buffer) => {
            req.destroy();
            resolve(d.byteLength);
          });
        });
        req.on("error", (err) => (req.destroyed ? undefined : reject(err)));
      });
      expect(firstChunk).toBeGreaterThan(0);
      expect(firstChunk).toBeLessThan(stl.byteLength);
      const again = await fetch(url, { headers: { cookie: tech }, signal: AbortSignal.timeout(20_000) });
      expect(again.status).toBe(200);
      expect(sha256(new Uint8Array(await again.arrayBuffer()))).toBe(sha256(stl));
    }
  });

  it("a file that is not there is 404, not a 500", async () => {
    const res = await fetch(`${appUrl()}/api/files/00000000-0000-4000-8000-000000000000/content`, { headers: { cookie: tech } });
    expect(res.status).toBe(404);
  });
});
