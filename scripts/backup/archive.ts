// What a Hearth backup archive holds and the steps backup and restore share. One gzipped tar
// (the `tar` package, https://www.npmjs.com/package/tar):
//   manifest.json   app version, migration level, row counts per table, sha256 of every file
//   database.dump   pg_dump -Fc of the whole database (https://www.postgresql.org/docs/15/app-pgdump.html)
//   objects/<key>   every object of the store's bucket, read through the S3 API
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import fs from "node:fs/promises";
import path from "node:path";
import { spawn } from "node:child_process";
import { S3Client } from "@aws-sdk/client-s3";
import { z } from "zod";
import type pg from "pg";
import { getEnv } from "@/lib/env";

export const MANIFEST = "manifest.json";
export const DUMP = "database.dump";
export const OBJECTS = "objects";

export const manifestSchema = z.object({
  format: z.literal(1),
  created_at: z.string(),
  app_version: z.string(),
  migration: z.object({ latest: z.string().nullable(), applied: z.array(z.string()) }),
  database: z.object({ file: z.literal(DUMP), bytes: z.number().int(), sha256: z.string().regex(/^[0-9a-f]{64}$/) }),
  tables: z.record(z.string(), z.number().int().nonnegative()),
  bucket: z.string(),
  objects: z.array(
    z.object({ key: z.string().min(1), bytes: z.number().int().nonnegative(), sha256: z.string().regex(/^[0-9a-f]{64}$/), content_type: z.string().nullable() }),
  ),
});
export type Manifest = z.infer<typeof manifestSchema>;

export function sha256File(file: string): Promise<string> {
  return new Promise((resolve, reject) => {
    const hash = createHash("sha256");
    createReadStream(file)
      .on("data", (c) => hash.update(c))
      .on("error", reject)
      .on("end", () => resolve(hash.digest("hex")));
  });
}

export const sha256 = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/** An object key as a path inside the archive: no absolute path, no `..`, nothing empty. */
export function objectPath(root: string, key: string): string {
  const parts = key.split("/");
  if (key.startsWith("/") || parts.some((p) => p === "" || p === "." || p === "..")) {
    throw new Error(`object key ${JSON.stringify(key)} cannot be stored as a file`);
  }
  return path.join(root, OBJECTS, ...parts);
}

/** The S3 client of the configured store, with timeouts: a store that hangs fails the run. */
export function storeClient(): { s3: S3Client; bucket: string } {
  const env = getEnv();
  const s3 = new S3Client({
    region: env.S3_REGION,
    endpoint: env.S3_ENDPOINT,
    forcePathStyle: env.S3_FORCE_PATH_STYLE === "true",
    credentials: { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY },
    requestHandler: { connectionTimeout: 5_000, requestTimeout: 120_000, throwOnRequestTimeout: true },
    // checksums only where S3 requires them: stores other than AWS may not speak the newer ones
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    maxAttempts: 3,
  });
  return { s3, bucket: env.S3_BUCKET };
}

/** PostgreSQL's client programs: HEARTH_PG_BIN, else Debian's PostgreSQL 15, else the PATH. */
export async function pgProgram(name: string): Promise<string> {
  const dirs = [process.env.HEARTH_PG_BIN, "/usr/lib/postgresql/15/bin"].filter((d): d is string => !!d);
  for (const dir of dirs) {
    const file = path.join(dir, name);
    if (await fs.access(file).then(() => true, () => false)) return file;
  }
  return name;
}

export function run(command: string, args: string[]): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { stdio: ["ignore", "inherit", "pipe"] });
    let err = "";
    child.stderr.on("data", (c: Buffer) => (err += c.toString()));
    child.on("error", reject);
    child.on("exit", (code) => (code === 0 ? resolve() : reject(new Error(`${path.basename(command)} exited with ${code}: ${err.trim()}`))));
  });
}

/** Row counts of every table in the public schema, as the given connection sees them. */
export async function countRows(client: pg.Client | pg.PoolClient): Promise<Record<string, number>> {
  const { rows } = await client.query<{ name: string }>(
    "select tablename as name from pg_tables where schemaname = 'public' order by tablename",
  );
  const out: Record<string, number> = {};
  for (const { name } of rows) {
    const r = await client.query<{ n: string }>(`select count(*) as n from public.${quoteIdent(name)}`);
    out[name] = Number(r.rows[0].n);
  }
  return out;
}

export const quoteIdent = (name: string) => `"${name.replace(/"/g, '""')}"`;

/** The package version and, in a git checkout, the commit. */
export async function appVersion(root: string): Promise<string> {
  const pkg = JSON.parse(await fs.readFile(path.join(root, "package.json"), "utf8")) as { version: string };
  try {
    const head = (await fs.readFile(path.join(root, ".git", "HEAD"), "utf8")).trim();
    const ref = head.startsWith("ref: ") ? (await fs.readFile(path.join(root, ".git", head.slice(5)), "utf8")).trim() : head;
    return `${pkg.version}+${ref.slice(0, 12)}`;
  } catch {
    return pkg.version;
  }
}

export function parseArgs(argv: string[]): { positional: string[]; flags: Map<string, string | true> } {
  const positional: string[] = [];
  const flags = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i];
    if (a.startsWith("--")) {
      const [k, v] = a.slice(2).split("=", 2);
      if (v !== undefined) flags.set(k, v);
      else if (argv[i + 1] !== undefined && !argv[i + 1].startsWith("--") && k !== "force") flags.set(k, argv[++i]);
      else flags.set(k, true);
    } else positional.push(a);
  }
  return { positional, flags };
}
