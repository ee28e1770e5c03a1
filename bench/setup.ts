// The app's production build that the benches which start the app share (a bench's own
// database comes from bench/fresh-database.ts).
import fs from "node:fs";
import path from "node:path";
import { spawnSync } from "node:child_process";
import { bin } from "../scripts/stack";

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
