import { readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { ESLint } from "eslint";
import { describe, expect, it } from "vitest";

// lib/ is the pure core shared by the web app, the worker and the benchmarks: it may not reach
// the database, the framework, a network client or the server-side rooms above it.
const ROOT = path.resolve(import.meta.dirname, "../..");
const FORBIDDEN = [/^@\/db\//, /^@\/adapters\//, /^@\/app\//, /^next(\/|$)/, /^server-only$/, /^pg$/, /^pg-boss$/, /^nodemailer$/, /^@aws-sdk\//];

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? sources(p) : /\.tsx?$/.test(name) ? [p] : [];
  });
}

function importsOf(file: string): string[] {
  const text = readFileSync(file, "utf8");
  return [...text.matchAll(/(?:import|export)\s[^;]*?from\s+["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)/g)].map((m) => m[1] ?? m[2]);
}

describe("layers", () => {
  it("no module in lib/ imports the database, the framework or a network client", () => {
    const offenders = sources(path.join(ROOT, "lib")).flatMap((f) =>
      importsOf(f)
        .filter((spec) => FORBIDDEN.some((re) => re.test(spec)))
        .map((spec) => `${path.relative(ROOT, f)} → ${spec}`),
    );
    expect(offenders).toEqual([]);
  });

  it("the lint rule refuses such an import in lib/ and allows it in db/", async () => {
    const eslint = new ESLint({ cwd: ROOT });
    const probe = 'import { getDb } from "@/db/client";\nimport PgBoss from "pg-boss";\nexport const x = [getDb, PgBoss];\n';
    const [inLib] = await eslint.lintText(probe, { filePath: path.join(ROOT, "lib/probe.ts") });
    const restricted = inLib.messages.filter((m) => m.ruleId === "no-restricted-imports");
    expect(restricted.map((m) => m.message).join("\n")).toMatch(/@\/db\/client[\s\S]*pg-boss/);
    const [inDb] = await eslint.lintText(probe, { filePath: path.join(ROOT, "db/probe.ts") });
    expect(inDb.messages.filter((m) => m.ruleId === "no-restricted-imports")).toEqual([]);
  });
});
