// npm run backup [-- --dir DIR] [--keep N]
// Writes DIR/hearth-<UTC time>.tar.gz (DIR: --dir, else HEARTH_BACKUP_DIR, else .data/backups):
// a pg_dump of one snapshot, every object of the store and a manifest. Runs beside a serving app:
// the dump and the row counts read one exported snapshot (https://www.postgresql.org/docs/15/functions-admin.html#FUNCTIONS-SNAPSHOT-SYNCHRONIZATION),
// so neither stops anything. --keep N then deletes all but the newest N archives in DIR.
import { createWriteStream } from "node:fs";
import fs from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { pipeline } from "node:stream/promises";
import type { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { GetObjectCommand, paginateListObjectsV2 } from "@aws-sdk/client-s3";
import pg from "pg";
import * as tar from "tar";
import { createDb } from "@/db/client";
import { currentMigration } from "@/db/migrate";
import { getEnv } from "@/lib/env";
import { DUMP, MANIFEST, appVersion, countRows, objectPath, parseArgs, pgProgram, run, sha256File, storeClient, type Manifest } from "./backup/archive";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const ARCHIVE = /^hearth-\d{8}T\d{6}Z\.tar\.gz$/;

export async function backup(dir: string): Promise<{ file: string; manifest: Manifest; ms: number }> {
  const started = performance.now();
  await fs.mkdir(dir, { recursive: true });
  const stamp = new Date().toISOString().replace(/[-:]/g, "").replace(/\.\d+Z$/, "Z");
  const name = `hearth-${stamp}`;
  const staging = await fs.mkdtemp(path.join(os.tmpdir(), "hearth-backup-"));
  try {
    const url = getEnv().DATABASE_URL;
    // The migration level first, then one snapshot for the counts and the dump.
    const { db } = createDb(url, 1);
    const level = await currentMigration(db).finally(() => db.destroy());
    const applied = await (async () => {
      const c = new pg.Client({ connectionString: url });
      await c.connect();
      try {
        return (await c.query<{ name: string }>("select name from kysely_migration order by name")).rows.map((r) => r.name);
      } finally {
        await c.end();
      }
    })();

    const client = new pg.Client({ connectionString: url });
    await client.connect();
    let tables: Record<string, number>;
    try {
      await client.query("begin isolation level repeatable read read only");
      const snapshot = (await client.query<{ id: string }>("select pg_export_snapshot() as id")).rows[0].id;
      tables = await countRows(client);
      await run(await pgProgram("pg_dump"), ["--format=custom", `--snapshot=${snapshot}`, `--file=${path.join(staging, DUMP)}`, `--dbname=${url}`]);
      await client.query("commit");
    } finally {
      await client.end();
    }
    const dumpStat = await fs.stat(path.join(staging, DUMP));

    // Objects after the snapshot: every object a row of the dump names was stored before it.
    const { s3, bucket } = storeClient();
    const objects: Manifest["objects"] = [];
    for await (const page of paginateListObjectsV2({ client: s3 }, { Bucket: bucket })) {
      for (const item of page.Contents ?? []) {
        if (!item.Key) continue;
        const file = objectPath(staging, item.Key);
        await fs.mkdir(path.dirname(file), { recursive: true });
        const obj = await s3.send(new GetObjectCommand({ Bucket: bucket, Key: item.Key }));
        if (!obj.Body) throw new Error(`object ${item.Key} has no body`);
        await pipeline(obj.Body as Readable, createWriteStream(file));
        const stat = await fs.stat(file);
        objects.push({ key: item.Key, bytes: stat.size, sha256: await sha256File(file), content_type: obj.ContentType ?? null });
      }
    }
    s3.destroy();

    const manifest: Manifest = {
      format: 1,
      created_at: new Date().toISOString(),
      app_version: await appVersion(root),
      migration: { latest: level.applied, applied },
      database: { file: DUMP, bytes: dumpStat.size, sha256: await sha256File(path.join(staging, DUMP)) },
      tables,
      bucket,
      objects,
    };
    await fs.writeFile(path.join(staging, MANIFEST), JSON.stringify(manifest, null, 2));

    // Written under a temporary name and renamed, so a half-written archive never looks finished.
    const file = path.join(dir, `${name}.tar.gz`);
    const partial = `${file}.partial`;
    const entries = [MANIFEST, DUMP, ...(objects.length ? ["objects"] : [])];
    await tar.c({ gzip: true, file: partial, cwd: staging, portable: true }, entries);
    await fs.rename(partial, file);
    return { file, manifest, ms: Math.round(performance.now() - started) };
  } finally {
    await fs.rm(staging, { recursive: true, force: true });
  }
}

/** Deletes all but the newest `keep` archives in dir (by the time in their names). */
export async function prune(dir: string, keep: number): Promise<string[]> {
  const names = (await fs.readdir(dir)).filter((n) => ARCHIVE.test(n)).sort();
  const gone = names.slice(0, Math.max(0, names.length - keep));
  for (const n of gone) await fs.rm(path.join(dir, n));
  return gone;
}

async function main() {
  const { flags } = parseArgs(process.argv.slice(2));
  const dirFlag = flags.get("dir");
  const dir = path.resolve(typeof dirFlag === "string" ? dirFlag : process.env.HEARTH_BACKUP_DIR || path.join(process.env.HEARTH_DATA_DIR || path.join(root, ".data"), "backups"));
  const keepFlag = flags.get("keep");
  const keep = keepFlag === undefined ? null : Number(keepFlag);
  if (keep !== null && (!Number.isInteger(keep) || keep < 1)) throw new Error("--keep takes a whole number of archives, 1 or more");
  const { file, manifest, ms } = await backup(dir);
  const size = (await fs.stat(file)).size;
  const rows = Object.values(manifest.tables).reduce((a, b) => a + b, 0);
  console.log(
    `[backup] ${file}: ${(size / 1024 / 1024).toFixed(1)} MiB, ${rows} rows in ${Object.keys(manifest.tables).length} tables, ${manifest.objects.length} objects, migration ${manifest.migration.latest}, ${ms} ms`,
  );
  if (keep !== null) {
    const gone = await prune(dir, keep);
    if (gone.length) console.log(`[backup] removed ${gone.length} older archive(s): ${gone.join(", ")}`);
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((err) => {
    console.error("[backup] failed:", err instanceof Error ? err.message : err);
    process.exit(1);
  });
}
