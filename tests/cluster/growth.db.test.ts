// Storage and the queue stay the size of what is live: a replaced geometry file's object goes,
// an object that no row names is swept, and a booking moved many times keeps one waiting job.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ListObjectsV2Command, PutObjectCommand } from "@aws-sdk/client-s3";
import { sql } from "kysely";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { boxMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { getEnv } from "@/lib/env";
import { getS3 } from "@/adapters/storage/s3";
import { sweepOrphanObjects } from "@/worker/orphans";
import { QUEUES } from "@/lib/jobs/queues";
import { hoursFromNow, makeDraftBuild, makeOrder, makePart, makePrinter } from "../floor/fixtures";

const { db, close } = testDb();
let tech: string;

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
});
afterAll(async () => {
  await close();
});

async function storedKeys(prefix: string) {
  const res = await getS3().send(new ListObjectsV2Command({ Bucket: getEnv().S3_BUCKET, Prefix: prefix }));
  return (res.Contents ?? []).map((o) => o.Key!).sort();
}

describe("stored objects", () => {
  it("five uploads to one part leave one object and one file row: each replaced file is deleted", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "17-4PH" });
    let last = "";
    for (let i = 1; i <= 5; i++) {
      const res = await api(`/api/parts/${part.id}/geometry`, {
        method: "POST",
        cookie: tech,
        body: writeBinaryStl(boxMesh(10 + i, 10, 10)),
        headers: { "content-type": "application/octet-stream", "x-filename": `rev-${i}.stl` },
      });
      expect(res.status, JSON.stringify(res.body)).toBe(201);
      last = res.body.file.id;
    }
    expect(await storedKeys(`geometry/${part.id}/`)).toEqual([`geometry/${part.id}/${last}.stl`]);
    const rows = await db.selectFrom("files").select("id").where("object_key", "like", `geometry/${part.id}/%`).execute();
    expect(rows.map((r) => r.id)).toEqual([last]);
    const current = await db.selectFrom("parts").select("geometry_file_id").where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(current.geometry_file_id).toBe(last);
  });

  it("the orphan sweep deletes an object no row names once it is old enough, and keeps the live one", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "17-4PH" });
    const res = await api(`/api/parts/${part.id}/geometry`, {
      method: "POST",
      cookie: tech,
      body: writeBinaryStl(boxMesh(10, 10, 10)),
      headers: { "content-type": "application/octet-stream", "x-filename": "live.stl" },
    });
    expect(res.status).toBe(201);
    const live = `geometry/${part.id}/${res.body.file.id}.stl`;
    // What an upload leaves when its process dies between storing the object and committing the row.
    const orphan = `geometry/${part.id}/00000000-0000-4000-8000-000000000000.stl`;
    await getS3().send(new PutObjectCommand({ Bucket: getEnv().S3_BUCKET, Key: orphan, Body: "left behind" }));
    const prefixes = [`geometry/${part.id}/`];
    const young = await sweepOrphanObjects(db, { minAgeSeconds: 3600, prefixes });
    expect(young.deleted).toEqual([]);
    expect(await storedKeys(prefixes[0])).toEqual([orphan, live].sort());
    const swept = await sweepOrphanObjects(db, { minAgeSeconds: 3600, prefixes, now: new Date(Date.now() + 2 * 3600_000) });
    expect(swept.deleted).toEqual([orphan]);
    expect(await storedKeys(prefixes[0])).toEqual([live]);
  });
});

describe("the advance queue", () => {
  it("a build moved eight times keeps one waiting advance job, for its latest version", async () => {
    const printer = await makePrinter(db, { materials: ["17-4PH"] });
    const { build } = await makeDraftBuild(tech, db, { material: "17-4PH" });
    let version = build.version;
    for (let i = 0; i < 8; i++) {
      const res = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version, printer_id: printer.id, starts_at: hoursFromNow(40 + i * 10).toISOString() } });
      expect(res.status, JSON.stringify(res.body)).toBe(200);
      version = res.body.build.version;
    }
    const waiting = await sql<{ singleton_key: string }>`
      select singleton_key from pgboss.job where name = ${QUEUES.advance} and state = 'created' and singleton_key like ${`build:${build.id}:%`}`.execute(db);
    expect(waiting.rows.map((r) => r.singleton_key)).toEqual([`build:${build.id}:${version}`]);
  });
});
