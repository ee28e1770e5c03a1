import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

// axe-core (Deque, MPL-2.0) injected into the page under test and run with the WCAG 2.x level A
// and AA rule tags. Evaluated through the DevTools protocol, so a page's own script policy
// cannot keep it out.
const require = createRequire(import.meta.url);
const AXE_SOURCE = readFileSync(require.resolve("axe-core/axe.min.js"), "utf8");

export const WCAG_TAGS = ["wcag2a", "wcag2aa", "wcag21a", "wcag21aa", "wcag22aa"];

export type AxeFinding = { id: string; impact: string | null; help: string; nodes: string[] };

/** The page's serious and critical violations (none is the bar), each with up to five offending nodes. */
export async function axeViolations(page: Page): Promise<AxeFinding[]> {
  const loaded = await page.evaluate(() => typeof (window as unknown as { axe?: unknown }).axe !== "undefined");
  if (!loaded) await page.evaluate(AXE_SOURCE);
  return page.evaluate(async (tags) => {
    const axe = (window as unknown as { axe: { run: (ctx: unknown, opts: unknown) => Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: unknown[]; failureSummary?: string }[] }[] }> } }).axe;
    const result = await axe.run(document, { runOnly: { type: "tag", values: tags }, resultTypes: ["violations"] });
    return result.violations
      .filter((v) => v.impact === "serious" || v.impact === "critical")
      .map((v) => ({ id: v.id, impact: v.impact, help: v.help, nodes: v.nodes.slice(0, 5).map((n) => `${JSON.stringify(n.target)} ${(n.failureSummary ?? "").split("\n").slice(1, 2).join("").trim()}`) }));
  }, WCAG_TAGS);
}
