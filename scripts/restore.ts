// npm run restore -- ARCHIVE [--force]
// Restores a `npm run backup` archive into the database of DATABASE_URL and the bucket of the S3_*
// settings. Both must be empty unless --force (which first empties them). An archive taken by a
// newer Hearth (a migration this code does not know) is refused: upgrade first, then restore.
import fs from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { CreateBucketCommand, DeleteObjectsCommand, HeadBucketCommand, PutObjectCommand, paginateListObjectsV2, type S3Client } from "@aws-sdk/client-s3";
import pg from "pg";
import * as tar from "tar";
import { getEnv } from "@/lib/env";
import { migrationsFolder } from "@/db/migrate";
import { DUMP, MANIFEST, countRows, manifestSchema, objectPath, parseArgs, pgProgram, run, sha256File, storeClient, type Manifest } from "./backup/archive";

export class RestoreRefused extends Error {}

async function knownMigrations(): Promise<string[]> {
  return (await fs.readdir(migrationsFolder)).filter((f) => f.endsWith(".sql")).map((f) => f.replace(/\.sql$/, "")).sort();
}

async function bucketKeys(s3: S3Client, bucket: string): Promise<string[] | null> {
  try {
    await s3.send(new HeadBucketCommand({ Bucket: bucket }));
  } catch {
    return null;
  }
  const keys: string[] = [];
  for await (const page of paginateListObjectsV2({ client: s3 }, { Bucket: bucket })) for (const o of page.Contents ?? []) if (o.Key) keys.push(o.Key);
  return keys;
}

export async function restore(archive: string, opts: { force?: boolean } = {}): Promise<{ manifest: Manifest; ms: number }> {
  const started = performance.now();
  const staging = await fs.mkdtemp(path.join(os.tmpdir(), "hearth-restore-"));
  const url = getEnv().DATABASE_URL;
  const client = new pg.Client({ connectionString: url });
  const { s3, bucket } = storeClient();
  try {
    await tar.x({ file: archive, cwd: staging, strict: true });
    const manifest = manifestSchema.parse(JSON.parse(await fs.readFile(path.join(staging, MANIFEST), "utf8")));

    const known = new Set(await knownMigrations());
    const unknown = manifest.migration.applied.filter((m) => !known.has(m));
    if (unknown.length) {
      throw new RestoreRefused(
        `this archive comes from a newer Hearth: its database has migration ${unknown.at(-1)}, which this version does not know ` +
          `(newest here: ${[...known].at(-1)}). Install the Hearth version that wrote it (${manifest.app_version}) or later, then restore.`,
      );
    }

    // Every file must match the manifest before anything is changed.
    if ((await sha256File(path.join(staging, DUMP))) !== manifest.database.sha256) throw new RestoreRefused("the database dump does not match its checksum; the archive is damaged");
    for (const o of manifest.objects) {
      if ((await sha256File(objectPath(staging, o.key))) !== o.sha256) throw new RestoreRefused(`object ${o.key} does not match its checksum; the archive is damaged`);
    }

    await client.connect();
    const tables = (await client.query("select 1 from pg_tables where schemaname in ('public', 'pgboss') limit 1")).rowCount ?? 0;
    const existing = await bucketKeys(s3, bucket);
    if (!opts.force && (tables > 0 || (existing?.length ?? 0) > 0)) {
      const what = [tables > 0 ? "the database already holds tables" : null, existing?.length ? `the bucket ${bucket} holds ${existing.length} object(s)` : null].filter(Boolean).join(" and ");
      throw new RestoreRefused(`refusing to restore: ${what}. Restore into an empty database and store, or add --force to replace what is there.`);
    }

    if (tables > 0) {
      await client.query("drop schema if exists pgboss cascade; drop schema public cascade; create schema public");
    }
    await run(await pgProgram("pg_restore"), ["--no-owner", "--no-acl", "--exit-on-error", "--single-transaction", `--dbname=${url}`, path.join(staging, DUMP)]);

    if (existing === null) await s3.send(new CreateBucketCommand({ Bucket: bucket }));
    else if (existing.length) {
      for (let i = 0; i < existing.length; i += 1000) {
        await s3.send(new DeleteObjectsCommand({ Bucket: bucket, Delete: { Objects: existing.slice(i, i + 1000).map((Key) => ({ Key })) } }));
      }
    }
    for (const o of manifest.objects) {
      await s3.send(
        new PutObjectCommand({
          Bucket: bucket,
          Key: o.key,
          // Whole bytes, not a stream: the SDK sends a stream with aws-chunked encoding, which
          // not every S3-compatible store understands (s3rver stores the chunk framing).
          Body: await fs.readFile(objectPath(staging, o.key)),
          ContentLength: o.bytes,
          ContentType: o.content_type ?? undefined,
        }),
      );
    }

    // The restored rows are the ones the backup counted.
    const counts = await countRows(client);
    const differs = Object.entries(manifest.tables).filter(([t, n]) => counts[t] !== n);
    if (differs.length) throw new Error(`restored row counts differ from the archive: ${differs.map(([t, n]) => `${t} ${counts[t]} ≠ ${n}`).join(", ")}`);
    return { manifest, ms: Math.round(performance.now() - started) };
  } finally {
    await client.end().catch(() => undefined);
    s3.destroy();
    await fs.rm(staging, { recursive: true, force: true });
  }
}

async function main() {
  const { positional, flags } = parseArgs(process.argv.slice(2));
  const archive = positional[0];
  if (!archive) throw new RestoreRefused("usage: npm run restore -- ARCHIVE [--force]");
  const { manifest, ms } = await restore(path.resolve(archive), { force: flags.has("force") });
  const rows = Object.values(manifest.tables).reduce((a, b) => a + b, 0);
  console.log(`[restore] ${archive}: ${rows} rows, ${manifest.objects.length} objects, migration ${manifest.migration.latest} (taken ${manifest.created_at}), ${ms} ms`);
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  main().catch((err) => {
    console.error(`[restore] ${err instanceof RestoreRefused ? "" : "failed: "}${err instanceof Error ? err.message : err}`);
    process.exit(err instanceof RestoreRefused ? 2 : 1);
  });
}
