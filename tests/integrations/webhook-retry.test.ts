// The webhook queue leans on two statements of pg-boss 10.4.2 (node_modules/pg-boss/src/plans.js):
// failJobs' back-off, which the delivery log's "next attempt" repeats, and insertJob, which the
// database's send_webhook_job repeats. A pg-boss that changes either fails here first.
import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { retryDelaySeconds } from "@/lib/integrations/webhook-signature";

const root = path.resolve(import.meta.dirname, "../..");
const plans = readFileSync(path.join(root, "node_modules/pg-boss/src/plans.js"), "utf8");
const migration = readFileSync(path.join(root, "migrations/202612042233_webhook_jobs.sql"), "utf8");

describe("webhook retries follow pg-boss's back-off", () => {
  it("uses the pinned pg-boss", () => {
    const pkg = JSON.parse(readFileSync(path.join(root, "node_modules/pg-boss/package.json"), "utf8"));
    expect(pkg.version).toBe("10.4.2");
  });

  it("waits at least retry_delay · 2^min(16, n+1) / 2 after the job's n-th retry failed (n = retry_count)", () => {
    expect(plans).toContain("retry_delay * 2 ^ LEAST(16, retry_count + 1) / 2 +");
    expect(plans).toContain("retry_delay * 2 ^ LEAST(16, retry_count + 1) / 2 * random()");
    // after the first, second, third … failed attempt, with a 30 s base: 30, 60, 120 … s, then 2^15 · 30 s
    expect([1, 2, 3, 4, 16, 17, 40].map((n) => retryDelaySeconds(n, 30))).toEqual([30, 60, 120, 240, 30 * 2 ** 15, 30 * 2 ** 15, 30 * 2 ** 15]);
    expect(retryDelaySeconds(1, 1)).toBe(1);
  });

  it("send_webhook_job writes the columns pg-boss's insertJob writes", () => {
    const insert = /function insertJob \(schema\) \{\s*return `\s*INSERT INTO \$\{schema\}\.job \(([^)]*)\)/.exec(plans);
    expect(insert).not.toBeNull();
    const theirs = insert![1].split(",").map((c) => c.trim());
    const ours = /insert into pgboss\.job \(([^)]*)\)/.exec(migration)![1].split(",").map((c) => c.trim());
    expect(ours).toEqual(theirs);
  });
});
