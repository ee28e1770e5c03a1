// What the benches that need a database or the built app set up the same way: a database of the
// bench's own, made afresh on the server DATABASE_URL names, and one production build of the app.
import fs from "node:fs";
import path from "node:path";
import { spawnSync } from "node:child_process";
import pg from "pg";
import { bin } from "../scripts/stack";

/** Drops and creates the database `name` beside DATABASE_URL's; its URL, and a way to drop it again. */
export async function freshDatabase(name: string): Promise<{ url: string; drop: () => Promise<void> }> {
  const base = new URL(process.env.DATABASE_URL ?? "postgres://postgres@127.0.0.1:54329/hearth");
  const admin = new URL(base);
  admin.pathname = "/postgres";
  const run = async (q: string) => {
    const c = new pg.Client({ connectionString: admin.toString() });
    await c.connect();
    try {
      await c.query(q);
    } finally {
      await c.end();
    }
  };
  await run(`drop database if exists "${name}" with (force)`);
  await run(`create database "${name}"`);
  const url = new URL(base);
  url.pathname = `/${name}`;
  return { url: url.toString(), drop: () => run(`drop database if exists "${name}" with (force)`) };
}

/** The app's production build: HEARTH_BENCH_NEXT_DIR when it holds one, else .next-bench, built once. */
export function ensureBuild(): string {
  const given = process.env.HEARTH_BENCH_NEXT_DIR;
  if (given && fs.existsSync(path.join(given, "BUILD_ID"))) return given;
  const dir = ".next-bench";
  if (!fs.existsSync(path.join(dir, "BUILD_ID")) || process.env.HEARTH_BENCH_REBUILD) {
    console.log(`[bench] building the app into ${dir} (once)`);
    const r = spawnSync(bin("next"), ["build"], { env: { ...process.env, NEXT_DIST_DIR: dir, NODE_ENV: "production" }, stdio: ["ignore", "ignore", "inherit"] });
    if (r.status !== 0) throw new Error("next build failed");
  }
  return dir;
}
