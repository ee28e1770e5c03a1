// npm run backup / npm run restore, round trip: a seeded shop with stored files is backed up while
// rows keep being written, restored into a fresh database and a second S3 store, and every table
// (md5 of its rows in order) and every object (sha256) is compared. Then the refusals: a target
// that is not empty, and an archive from a newer migration level.
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { GetObjectCommand, ListObjectsV2Command, PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import pg from "pg";
import S3rver from "s3rver";
import * as tar from "tar";
import { afterAll, beforeAll, expect, it } from "vitest";
import { createDb } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { seedDemoShop } from "@/db/seed";
import { sha256, type Manifest } from "../../scripts/backup/archive";
import { scratchDatabase } from "../helpers/db";

type Store = { server: S3rver; endpoint: string; client: S3Client; dir: string };
let source: Awaited<ReturnType<typeof scratchDatabase>>;
let target: Awaited<ReturnType<typeof scratchDatabase>>;
let storeA: Store;
let storeB: Store;
let work: string;
const s3Base = Number(process.env.S3_PORT ?? 4669);

async function startStore(port: number, bucket: boolean): Promise<Store> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "hearth-store-"));
  const server = new S3rver({ address: "127.0.0.1", port, silent: true, directory: dir, configureBuckets: bucket ? [{ name: "hearth", configs: [] }] : [] });
  await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  const client = new S3Client({ region: "us-east-1", endpoint, forcePathStyle: true, credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" } });
  return { server, endpoint, client, dir };
}

const OBJECTS: Record<string, Uint8Array> = {
  "parts/geometry/3f9a-bracket.stl": randomBytes(300_000),
  "inspections/71c2/report 1.pdf": randomBytes(20_000),
  "inspections/71c2/photo.jpg": randomBytes(50_000),
};

beforeAll(async () => {
  work = fs.mkdtempSync(path.join(os.tmpdir(), "hearth-backup-test-"));
  source = await scratchDatabase("bk_src");
  target = await scratchDatabase("bk_dst");
  const { db } = createDb(source.url, 2);
  await migrateToLatest(db);
  await seedDemoShop(db);
  await db.destroy();
  storeA = await startStore(s3Base + 13, true);
  storeB = await startStore(s3Base + 14, false);
  for (const [Key, Body] of Object.entries(OBJECTS)) {
    await storeA.client.send(new PutObjectCommand({ Bucket: "hearth", Key, Body, ContentType: Key.endsWith(".pdf") ? "application/pdf" : "application/octet-stream" }));
  }
});

afterAll(async () => {
  for (const s of [storeA, storeB]) {
    if (!s) continue;
    s.client.destroy();
    await s.server.close();
    fs.rmSync(s.dir, { recursive: true, force: true });
  }
  await source?.drop();
  await target?.drop();
  if (work) fs.rmSync(work, { recursive: true, force: true });
});

function cli(script: string, args: string[], db: string, store: Store): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["--import", "tsx", script, ...args], {
      env: { ...process.env, DATABASE_URL: db, S3_ENDPOINT: store.endpoint, S3_BUCKET: "hearth" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    child.stdout.on("data", (c: Buffer) => (out += c));
    child.stderr.on("data", (c: Buffer) => (out += c));
    child.on("exit", (code) => resolve({ code, out }));
  });
}

/** md5 of each public table's rows as text, in order: equal digests, equal tables. */
async function tableDigests(url: string): Promise<Record<string, { rows: number; md5: string }>> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    const { rows: tables } = await c.query<{ t: string }>("select tablename as t from pg_tables where schemaname = 'public' order by 1");
    const out: Record<string, { rows: number; md5: string }> = {};
    for (const { t } of tables) {
      const r = await c.query<{ n: string; md5: string }>(`select count(*) as n, coalesce(md5(string_agg(x::text, E'\\n' order by x::text)), '') as md5 from public."${t}" x`);
      out[t] = { rows: Number(r.rows[0].n), md5: r.rows[0].md5 };
    }
    return out;
  } finally {
    await c.end();
  }
}

async function storeDigests(store: Store): Promise<Record<string, string>> {
  const list = await store.client.send(new ListObjectsV2Command({ Bucket: "hearth" }));
  const out: Record<string, string> = {};
  for (const o of list.Contents ?? []) {
    const obj = await store.client.send(new GetObjectCommand({ Bucket: "hearth", Key: o.Key! }));
    out[o.Key!] = sha256(await obj.Body!.transformToByteArray());
  }
  return out;
}

it("backs up a working shop and restores every table and object into an empty database and store", async () => {
  // Rows keep arriving while the backup runs, as they would from a serving app.
  const writer = new pg.Client({ connectionString: source.url });
  await writer.connect();
  let writing = true;
  let written = 0;
  const writes = (async () => {
    while (writing) {
      await writer.query("insert into worker_heartbeats (worker_id, host, pid) values ($1, 'test', 1)", [`w-${written++}`]);
      await new Promise((r) => setTimeout(r, 20));
    }
  })();
  const dir = path.join(work, "archives");
  const made = await cli("scripts/backup.ts", ["--dir", dir], source.url, storeA);
  writing = false;
  await writes;
  await writer.end();
  expect(made.out).toMatch(/\[backup\] /);
  expect(made.code).toBe(0);
  const archives = fs.readdirSync(dir);
  expect(archives).toHaveLength(1);
  expect(archives[0]).toMatch(/^hearth-\d{8}T\d{6}Z\.tar\.gz$/);
  const archive = path.join(dir, archives[0]);

  const listed: string[] = [];
  await tar.t({ file: archive, onReadEntry: (e) => void listed.push(e.path) });
  expect(listed).toEqual(expect.arrayContaining(["manifest.json", "database.dump", "objects/parts/geometry/3f9a-bracket.stl", "objects/inspections/71c2/report 1.pdf"]));

  const restored = await cli("scripts/restore.ts", [archive], target.url, storeB);
  expect(restored.out).toMatch(/\[restore\] /);
  expect(restored.code).toBe(0);

  // Every object, byte for byte; every table, row for row (the heartbeats as the snapshot saw them).
  expect(await storeDigests(storeB)).toEqual(Object.fromEntries(Object.entries(OBJECTS).map(([k, v]) => [k, sha256(v)])));
  const extract = path.join(work, "x");
  fs.mkdirSync(extract);
  await tar.x({ file: archive, cwd: extract }, ["manifest.json"]);
  const manifest = JSON.parse(fs.readFileSync(path.join(extract, "manifest.json"), "utf8")) as Manifest;
  const [a, b] = [await tableDigests(source.url), await tableDigests(target.url)];
  expect(Object.keys(b)).toEqual(Object.keys(a));
  expect(Object.keys(a).length).toBeGreaterThan(20);
  for (const t of Object.keys(a)) {
    expect(b[t].rows, t).toBe(manifest.tables[t]);
    if (t !== "worker_heartbeats") expect(b[t], t).toEqual(a[t]);
  }
  expect(manifest.tables.orders).toBeGreaterThan(0);
  expect(manifest.tables.worker_heartbeats).toBeLessThanOrEqual(a.worker_heartbeats.rows);
  expect(manifest.objects.map((o) => o.key).sort()).toEqual(Object.keys(OBJECTS).sort());
  expect(manifest.migration.latest).toBe(fs.readdirSync("migrations").filter((f) => f.endsWith(".sql")).sort().at(-1)!.replace(/\.sql$/, ""));

  // The target is no longer empty: refused without --force, replaced with it.
  const again = await cli("scripts/restore.ts", [archive], target.url, storeB);
  expect(again.code).toBe(2);
  expect(again.out).toMatch(/refusing to restore: the database already holds tables and the bucket hearth holds 3 object\(s\).*--force/);
  const forced = await cli("scripts/restore.ts", [archive, "--force"], target.url, storeB);
  expect(forced.code).toBe(0);
  expect((await tableDigests(target.url)).orders).toEqual(a.orders);

  // An archive from a newer Hearth (a migration this code does not know) is refused.
  const newer = path.join(work, "newer");
  fs.mkdirSync(newer);
  await tar.x({ file: archive, cwd: newer });
  const m = JSON.parse(fs.readFileSync(path.join(newer, "manifest.json"), "utf8")) as Manifest;
  m.migration.applied.push("209912312359_from_the_future");
  m.migration.latest = "209912312359_from_the_future";
  fs.writeFileSync(path.join(newer, "manifest.json"), JSON.stringify(m));
  const newerArchive = path.join(work, "hearth-newer.tar.gz");
  await tar.c({ gzip: true, file: newerArchive, cwd: newer }, fs.readdirSync(newer));
  const refused = await cli("scripts/restore.ts", [newerArchive, "--force"], target.url, storeB);
  expect(refused.code).toBe(2);
  expect(refused.out).toMatch(/newer Hearth: its database has migration 209912312359_from_the_future/);
});

it("keeps only the newest N archives with --keep", async () => {
  const dir = path.join(work, "keep");
  fs.mkdirSync(dir);
  for (const n of ["hearth-20260101T000000Z.tar.gz", "hearth-20260102T000000Z.tar.gz", "hearth-20260103T000000Z.tar.gz", "notes.txt"]) fs.writeFileSync(path.join(dir, n), "x");
  const made = await cli("scripts/backup.ts", ["--dir", dir, "--keep", "2"], source.url, storeA);
  expect(made.code).toBe(0);
  const left = fs.readdirSync(dir).sort();
  expect(left).toHaveLength(3);
  expect(left[0]).toBe("hearth-20260103T000000Z.tar.gz");
  expect(left[1]).toMatch(/^hearth-2\d{7}T\d{6}Z\.tar\.gz$/);
  expect(left[2]).toBe("notes.txt");
});
