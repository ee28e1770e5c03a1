import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { auditVerdict } from "@/scripts/audit-verdict";

// Report shapes as npm 11's `npm audit --json` prints them (auditReportVersion 2), and the two
// failures it prints when the advisory service cannot be used: an HTTP refusal (a registry
// mirror that serves only GET answers 405) and a refused connection.
const report = (counts: Record<string, number>, vulnerabilities: Record<string, unknown> = {}) =>
  JSON.stringify({
    auditReportVersion: 2,
    vulnerabilities,
    metadata: {
      vulnerabilities: { info: 0, low: 0, moderate: 0, high: 0, critical: 0, ...counts },
      dependencies: { prod: 120, dev: 0, optional: 0, peer: 0, peerOptional: 0, total: 120 },
    },
  });
const advisory = (name: string, severity: string) => ({
  name,
  severity,
  isDirect: true,
  via: [{ source: 1, name, dependency: name, title: `${name} advisory`, url: "https://example.org/advisory", severity, range: "<9.9.9" }],
  effects: [],
  range: "<9.9.9",
  nodes: [`node_modules/${name}`],
  fixAvailable: true,
});
const REFUSED_405 = JSON.stringify({
  message: "405 Method Not Allowed - POST https://registry.npmjs.org/-/npm/v1/security/advisories/bulk",
  method: "POST",
  statusCode: 405,
  body: "",
  error: { summary: "", detail: "" },
});
const OFFLINE = JSON.stringify({
  message: "request to http://127.0.0.1:9/-/npm/v1/security/advisories/bulk failed, reason: connect ECONNREFUSED 127.0.0.1:9",
  error: { summary: "", detail: "" },
});

describe("audit verdict", () => {
  it("a clean report and one with only low or moderate findings pass", () => {
    expect(auditVerdict(report({}))).toMatchObject({ outcome: "clean", exitCode: 0 });
    const moderate = auditVerdict(report({ moderate: 2, low: 1, total: 3 }, { a: advisory("a", "moderate") }));
    expect(moderate).toMatchObject({ outcome: "clean", exitCode: 0 });
    expect(moderate.lines[0]).toContain("2 moderate");
  });

  it("a high or critical finding fails and names the package", () => {
    for (const severity of ["high", "critical"]) {
      const verdict = auditVerdict(report({ [severity]: 1, total: 1 }, { "some-lib": advisory("some-lib", severity) }));
      expect(verdict).toMatchObject({ outcome: "findings", exitCode: 1 });
      expect(verdict.lines.join("\n")).toContain(`${severity}: some-lib`);
    }
  });

  it("an unreachable advisory service is said plainly and passes", () => {
    for (const out of [REFUSED_405, OFFLINE]) {
      const verdict = auditVerdict(out);
      expect(verdict).toMatchObject({ outcome: "unavailable", exitCode: 0 });
      expect(verdict.lines[0]).toMatch(/NOT audited/);
    }
    expect(auditVerdict("", { timedOut: true })).toMatchObject({ outcome: "unavailable", exitCode: 0 });
  });

  it("any other failure of npm audit fails (a missing lock file, no report at all)", () => {
    const noLock = JSON.stringify({ error: { code: "ENOLOCK", summary: "This command requires an existing lockfile." } });
    expect(auditVerdict(noLock)).toMatchObject({ outcome: "error", exitCode: 1 });
    expect(auditVerdict("npm ERR! something")).toMatchObject({ outcome: "error", exitCode: 1 });
    expect(auditVerdict("")).toMatchObject({ outcome: "error", exitCode: 1 });
  });

  it("the audit script exits with the verdict's code", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "hearth-audit-"));
    const run = (content: string) => {
      const file = path.join(dir, "report.json");
      fs.writeFileSync(file, content);
      return spawnSync(process.execPath, ["--import", "tsx", "scripts/audit.ts"], {
        env: { ...process.env, HEARTH_AUDIT_REPORT: file },
        encoding: "utf8",
      });
    };
    try {
      const high = run(report({ high: 1, total: 1 }, { x: advisory("x", "high") }));
      expect(high.status).toBe(1);
      expect(high.stderr).toContain("high: x");
      const offline = run(OFFLINE);
      expect(offline.status).toBe(0);
      expect(offline.stdout).toContain("NOT audited");
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });
});
