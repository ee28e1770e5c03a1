// npx tsx bench/backup-bench.ts: backup and restore time and archive size for the demo shop plus
// the floor bench's 24 printers and 10,000 builds (bench/floor-bench.ts seedFloor), with
// HEARTH_BENCH_BACKUP_OBJECTS (20) stored files of 1 MiB. Uses DATABASE_URL's server (databases
// hearth_bench_backup and hearth_bench_restore) and two s3rver stores on S3_PORT+1 and S3_PORT+2.
import { spawn } from "node:child_process";
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import pg from "pg";
import S3rver from "s3rver";

process.env.HEARTH_BENCH_FLOOR_DB ??= "hearth_bench_backup";
const { freshDatabase, seedFloor } = await import("./floor-bench");
const { createDb } = await import("@/db/client");
const { migrateToLatest } = await import("@/db/migrate");

const s3Port = Number(process.env.S3_PORT ?? 4569);
const nObjects = Number(process.env.HEARTH_BENCH_BACKUP_OBJECTS ?? 20);
const work = fs.mkdtempSync(path.join(os.tmpdir(), "hearth-backup-bench-"));

async function store(port: number, bucket: boolean) {
  const server = new S3rver({ address: "127.0.0.1", port, silent: true, directory: path.join(work, `s3-${port}`), configureBuckets: bucket ? [{ name: "hearth", configs: [] }] : [] });
  await server.run();
  return { server, endpoint: `http://127.0.0.1:${port}` };
}

// Asynchronous: the stores run in this process and must keep answering meanwhile.
async function timed(script: string, args: string[], env: Record<string, string>): Promise<number> {
  const t = performance.now();
  const child = spawn(process.execPath, ["--import", "tsx", script, ...args], { env: { ...process.env, ...env }, stdio: "inherit" });
  const code = await new Promise<number | null>((resolve) => child.on("exit", resolve));
  if (code !== 0) throw new Error(`${script} exited with ${code}`);
  return Math.round(performance.now() - t);
}

const source = await freshDatabase();
const { db } = createDb(source.url, 4);
await migrateToLatest(db);
const seeded = await seedFloor(db);
await db.destroy();
const a = await store(s3Port + 1, true);
const b = await store(s3Port + 2, false);
const s3 = new S3Client({ region: "us-east-1", endpoint: a.endpoint, forcePathStyle: true, credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" } });
for (let i = 0; i < nObjects; i++) await s3.send(new PutObjectCommand({ Bucket: "hearth", Key: `parts/geometry/bench-${i}.stl`, Body: randomBytes(1024 * 1024) }));
s3.destroy();

const targetUrl = new URL(source.url);
targetUrl.pathname = "/hearth_bench_restore";
const admin = new URL(source.url);
admin.pathname = "/postgres";
const c = new pg.Client({ connectionString: admin.toString() });
await c.connect();
await c.query(`drop database if exists hearth_bench_restore with (force)`);
await c.query(`create database hearth_bench_restore`);

const dir = path.join(work, "archives");
const backupMs = await timed("scripts/backup.ts", ["--dir", dir], { DATABASE_URL: source.url, S3_ENDPOINT: a.endpoint });
const archive = path.join(dir, fs.readdirSync(dir)[0]);
const bytes = fs.statSync(archive).size;
const restoreMs = await timed("scripts/restore.ts", [archive], { DATABASE_URL: targetUrl.toString(), S3_ENDPOINT: b.endpoint });
const size = await c.query<{ s: string }>(`select pg_size_pretty(pg_database_size('${source.url.split("/").pop()}')) as s`);

console.log(
  JSON.stringify({ builds: seeded.builds, database_size: size.rows[0].s, objects: nObjects, object_mib: nObjects, backup_ms: backupMs, restore_ms: restoreMs, archive_mib: Math.round((bytes / 1024 / 1024) * 10) / 10 }),
);
await c.query(`drop database if exists hearth_bench_restore with (force)`);
await c.end();
await source.drop();
await a.server.close();
await b.server.close();
fs.rmSync(work, { recursive: true, force: true });
