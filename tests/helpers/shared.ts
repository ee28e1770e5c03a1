import fs from "node:fs";
import path from "node:path";

const REPO_ROOT = path.resolve(import.meta.dirname, "../..");

/**
 * A folder of the read-only shared material that lies beside the repository (CI lays it beside
 * its fresh clone), or in the machine-wide copy; undefined when neither exists, so that a test
 * can skip with a message instead of failing on a checkout without it.
 */
export function sharedFolder(sub: string): string | undefined {
  const candidates = [path.resolve(REPO_ROOT, "..", "shared", sub), path.join("/work/shared", sub)];
  return candidates.find((dir) => fs.existsSync(dir));
}
