// npm run audit (and the CI test run): known advisories against the production dependencies.
// High or critical fails; a registry that does not answer is reported and passes.
// HEARTH_AUDIT_REPORT=FILE judges a saved `npm audit --json` output instead of asking the registry.
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { auditVerdict } from "./audit-verdict";

const TIMEOUT_MS = 120_000;
const saved = process.env.HEARTH_AUDIT_REPORT;
let stdout: string;
let timedOut = false;
if (saved) {
  stdout = fs.readFileSync(saved, "utf8");
} else {
  const run = spawnSync(
    "npm",
    ["audit", "--omit=dev", "--json", "--fetch-retries=1", "--fetch-timeout=30000"],
    { cwd: path.resolve(import.meta.dirname, ".."), encoding: "utf8", timeout: TIMEOUT_MS, maxBuffer: 64 * 1024 * 1024 },
  );
  stdout = run.stdout ?? "";
  timedOut = (run.error as NodeJS.ErrnoException | undefined)?.code === "ETIMEDOUT";
}
const verdict = auditVerdict(stdout, { timedOut });
for (const line of verdict.lines) (verdict.exitCode ? console.error : console.log)(`[audit] ${line}`);
process.exit(verdict.exitCode);
