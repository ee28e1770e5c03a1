import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ListObjectsV2Command } from "@aws-sdk/client-s3";
import { testDb } from "../helpers/db";
import { appUrl } from "../helpers/browser";
import { api, DEMO, signIn } from "../helpers/session";
import { boxMesh, writeAsciiStl, writeBinaryStl } from "@/lib/geometry/generate";
import { getEnv } from "@/lib/env";
import { getS3 } from "@/adapters/storage/s3";
import { makeOrder, makePart } from "../floor/fixtures";

// Geometry upload against the running app, its S3 fake and its worker: checked before
// anything is stored, analysed by the worker, nothing half-stored on a refusal.

const { db, close } = testDb();
let tech: string;

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
});
afterAll(async () => {
  await close();
});

async function upload(partId: string, body: Uint8Array | string, opts: { filename?: string; type?: string; cookie?: string } = {}) {
  return api(`/api/parts/${partId}/geometry`, {
    method: "POST",
    cookie: opts.cookie ?? tech,
    body: typeof body === "string" ? body : body,
    headers: { "content-type": opts.type ?? "application/octet-stream", "x-filename": encodeURIComponent(opts.filename ?? "part.stl") },
  });
}

async function waitForAnalysis(fileId: string, timeoutMs = 30_000) {
  const deadline = Date.now() + timeoutMs;
  const seen = new Set<string>();
  for (;;) {
    const res = await api(`/api/files/${fileId}`, { cookie: tech });
    seen.add(res.body.file.status);
    if (res.body.file.status === "done" || res.body.file.status === "failed") return { file: res.body.file, seen };
    if (Date.now() > deadline) throw new Error(`analysis did not finish: ${JSON.stringify(res.body)}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

async function storedObjects(partId: string) {
  const res = await getS3().send(new ListObjectsV2Command({ Bucket: getEnv().S3_BUCKET, Prefix: `geometry/${partId}/` }));
  return res.Contents ?? [];
}

async function newPart() {
  const order = await makeOrder(tech);
  return makePart(tech, db, { order_id: order.id, material: "17-4PH", size: [40, 30, 20] });
}

describe("geometry upload", () => {
  it("stores a binary STL, queues it, and the worker measures it: volume, box, closed; the part gets its volume", async () => {
    const part = await newPart();
    const res = await upload(part.id, writeBinaryStl(boxMesh(40, 30, 20)));
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.file.status).toBe("queued");
    expect(res.body.file.triangles).toBe(12);
    const { file } = await waitForAnalysis(res.body.file.id);
    expect(file.status).toBe("done");
    expect(file.analysis.volume_mm3).toBeCloseTo(24_000, 3);
    expect(file.analysis.bounds.size).toEqual({ x: 40, y: 30, z: 20 });
    expect(file.analysis.closed).toBe(true);
    expect(await storedObjects(part.id)).toHaveLength(1);
    const row = await db.selectFrom("parts").select(["volume_mm3", "geometry_file_id"]).where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(row.geometry_file_id).toBe(res.body.file.id);
    expect(Number(row.volume_mm3)).toBeCloseTo(24_000, 3);
    const content = await fetch(`${appUrl()}/api/files/${res.body.file.id}/content`, { headers: { cookie: tech } });
    expect(content.status).toBe(200);
    expect((await content.arrayBuffer()).byteLength).toBe(84 + 50 * 12);
  });

  it("reads ASCII STL too, and an open mesh is analysed with a 'not closed' verdict and leaves the part's volume alone", async () => {
    const part = await newPart();
    const ascii = await upload(part.id, writeAsciiStl(boxMesh(10, 10, 10), "cube"), { type: "text/plain" });
    expect(ascii.status, JSON.stringify(ascii.body)).toBe(201);
    expect((await waitForAnalysis(ascii.body.file.id)).file.analysis.volume_mm3).toBeCloseTo(1000, 3);
    const open = boxMesh(10, 10, 10).slice(0, 9 * 11); // one triangle missing
    const res = await upload(part.id, writeBinaryStl(open));
    expect(res.status).toBe(201);
    const { file } = await waitForAnalysis(res.body.file.id);
    expect(file.status).toBe("done");
    expect(file.analysis.closed).toBe(false);
    expect(file.analysis.closed_reason).toMatch(/open edge/);
    const row = await db.selectFrom("parts").select("volume_mm3").where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(Number(row.volume_mm3)).toBeCloseTo(1000, 3);
  });

  it("refuses a malformed file with the parser's reason and stores nothing: no row, no object", async () => {
    const part = await newPart();
    const before = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    const good = writeBinaryStl(boxMesh(10, 10, 10));
    const cases: Array<[Uint8Array | string, RegExp]> = [
      [good.subarray(0, good.length - 7), /cut short|truncat/i],
      ["solid x\nfacet normal 0 0 1\nouter loop\nvertex 0 0 0\n", /STL/],
      ["this is a plain text file, not a mesh", /not an STL|solid/],
    ];
    for (const [body, reason] of cases) {
      const res = await upload(part.id, body);
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(res.body.error.message).toMatch(reason);
      expect(res.body.error.fieldErrors.file.length).toBe(1);
    }
    const after = await db.selectFrom("files").select((eb) => eb.fn.countAll<number>().as("n")).executeTakeFirstOrThrow();
    expect(Number(after.n)).toBe(Number(before.n));
    expect(await storedObjects(part.id)).toEqual([]);
    const row = await db.selectFrom("parts").select("geometry_file_id").where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(row.geometry_file_id).toBeNull();
  });

  it("refuses other file names (422), a media type that cannot be STL (415), an empty file (422) and a file over the limit (413)", async () => {
    const part = await newPart();
    const stl = writeBinaryStl(boxMesh(10, 10, 10));
    expect((await upload(part.id, stl, { filename: "part.step" })).status).toBe(422);
    expect((await upload(part.id, stl, { type: "image/png" })).status).toBe(415);
    expect((await upload(part.id, new Uint8Array())).status).toBe(422);
    const big = new Uint8Array(getEnv().UPLOAD_MAX_BYTES + 1);
    const tooBig = await upload(part.id, big);
    expect(tooBig.status).toBe(413);
    expect(tooBig.body.error.code).toBe("payload_too_large");
    expect(await storedObjects(part.id)).toEqual([]);
  });

  it("is refused to a machinist (403)", async () => {
    const part = await newPart();
    const machinist = await signIn(DEMO.machinist);
    expect((await upload(part.id, writeBinaryStl(boxMesh(5, 5, 5)), { cookie: machinist })).status).toBe(403);
  });
});
