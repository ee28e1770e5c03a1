// What `npm audit --omit=dev --json` printed, judged: a high or critical advisory against a
// production dependency fails; an advisory service that could not be reached is said plainly
// and passes, so a network fault is never mistaken for a clean report nor for a finding.

export type AuditVerdict = {
  outcome: "clean" | "findings" | "unavailable" | "error";
  /** The process exit code the audit step should end with. */
  exitCode: 0 | 1;
  lines: string[];
};

const SEVERITIES = ["critical", "high", "moderate", "low", "info"] as const;
type Severity = (typeof SEVERITIES)[number];
const FAILING: Severity[] = ["critical", "high"];

// Node's and npm's words for a registry that did not answer (DNS, refused, reset, timed out).
const NETWORK = /ENOTFOUND|EAI_AGAIN|ECONNREFUSED|ECONNRESET|ETIMEDOUT|ESOCKETTIMEDOUT|ENETUNREACH|EHOSTUNREACH|socket hang up|network timeout|request to \S+ failed/i;

type Advisory = { title?: string; url?: string; severity?: string };
type Vulnerability = { name?: string; severity?: string; range?: string; via?: (string | Advisory)[]; fixAvailable?: unknown };
type Report = {
  vulnerabilities?: Record<string, Vulnerability>;
  metadata?: { vulnerabilities?: Partial<Record<Severity | "total", number>> };
  message?: string;
  statusCode?: number;
  error?: { code?: string; summary?: string; detail?: string };
};

export function auditVerdict(stdout: string, opts: { timedOut?: boolean } = {}): AuditVerdict {
  if (opts.timedOut) {
    return unavailable("npm audit did not finish in time (the registry did not answer)");
  }
  let report: Report;
  try {
    report = JSON.parse(stdout) as Report;
  } catch {
    const first = stdout.trim().split("\n")[0] ?? "";
    return { outcome: "error", exitCode: 1, lines: [`npm audit printed no JSON report: ${first.slice(0, 200) || "(nothing)"}`] };
  }
  const counts = report.metadata?.vulnerabilities;
  if (counts && typeof counts === "object") {
    const summary = SEVERITIES.map((s) => `${counts[s] ?? 0} ${s}`).join(", ");
    const failing = Object.values(report.vulnerabilities ?? {}).filter((v) =>
      FAILING.includes((v.severity ?? "") as Severity),
    );
    const failingCount = FAILING.reduce((n, s) => n + (counts[s] ?? 0), 0);
    if (failingCount > 0 || failing.length > 0) {
      return {
        outcome: "findings",
        exitCode: 1,
        lines: [`npm audit (production dependencies): ${summary}`, ...failing.map(describe)],
      };
    }
    return { outcome: "clean", exitCode: 0, lines: [`npm audit (production dependencies): ${summary}; none high or critical`] };
  }
  const message = [report.message, report.error?.code, report.error?.summary].filter(Boolean).join(" ");
  if (typeof report.statusCode === "number" || NETWORK.test(message)) {
    return unavailable(`the registry's advisory service could not be reached: ${message || `HTTP ${report.statusCode}`}`);
  }
  return { outcome: "error", exitCode: 1, lines: [`npm audit failed: ${message || stdout.slice(0, 200)}`] };
}

function unavailable(reason: string): AuditVerdict {
  return {
    outcome: "unavailable",
    exitCode: 0,
    lines: [`npm audit skipped: ${reason}. Production dependencies were NOT audited in this run.`],
  };
}

function describe(v: Vulnerability): string {
  const advisories = (v.via ?? [])
    .map((a) => (typeof a === "string" ? `via ${a}` : [a.title, a.url].filter(Boolean).join(" ")))
    .join("; ");
  const fix = v.fixAvailable ? "fix available" : "no fix available";
  return `  ${v.severity}: ${v.name} ${v.range ?? ""} (${fix}) ${advisories}`.trimEnd();
}
