import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { axeViolations, type AxeFinding } from "../helpers/axe";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, signIn } from "../helpers/session";
import { WIDTHS, type Width } from "../helpers/viewports";
import { can, navFor, type Role } from "@/lib/auth/permissions";

// Every page, for every role, at a phone, a tablet and a desktop width: no page scrolls sideways as a
// whole on the phone (document.scrollingElement.scrollWidth ≤ innerWidth), and axe-core finds no
// serious or critical WCAG 2.x A/AA violation at the phone and desktop widths. One browser and one
// started app for all of it; one context per role and width.

const { db, close } = testDb();
let browser: Browser;
const ids: Record<string, string> = {};

beforeAll(async () => {
  browser = await launchBrowser();
  const one = async (q: Promise<{ id: string } | undefined>, key: string) => {
    const row = await q;
    if (row) ids[key] = row.id;
  };
  await Promise.all([
    one(db.selectFrom("units").select("id").where("state", "=", "brown").where("serial", "like", "WO-%").orderBy("serial").executeTakeFirst(), "unit"),
    one(db.selectFrom("units").select("id").where("state", "in", ["ready_for_finishing", "finishing"]).orderBy("serial").executeTakeFirst(), "finishing_unit"),
    one(db.selectFrom("builds").select("id").where("state", "=", "scheduled").orderBy("code").executeTakeFirst(), "build"),
    one(db.selectFrom("furnace_runs").select("id").orderBy("code").executeTakeFirst(), "run"),
    one(db.selectFrom("wash_batches").select("id").orderBy("code").executeTakeFirst(), "wash"),
    one(db.selectFrom("parts").select("id").orderBy("part_number").executeTakeFirst(), "part"),
  ]);
});

afterAll(async () => {
  await browser?.close();
  await close();
});

/** The pages a role can open: its navigation, its own settings, the record pages every role reads, and the scan page. */
function pagesFor(role: Role): string[] {
  const pages = navFor(role).map((n) => n.href);
  if (can(role, "setup:write")) pages.push("/setup/users", "/setup/equipment", "/setup/materials", "/setup/profiles", "/setup/settings", "/setup/jobs", "/setup/tokens", "/setup/webhooks", "/setup/api");
  if (can(role, "shop:read")) pages.push("/finishing/calibration");
  pages.push("/settings");
  for (const [key, prefix] of [["unit", "/units/"], ["build", "/builds/"], ["run", "/furnace-runs/"], ["wash", "/batches/wash/"], ["part", "/parts/"], ["finishing_unit", "/finishing/"]] as const) {
    if (ids[key]) pages.push(`${prefix}${ids[key]}`);
  }
  return [...new Set(pages)];
}

/** Waits until the page's client data has arrived: the network quiet and no "Loading" line left. */
async function settle(page: Page) {
  await page.waitForLoadState("networkidle", { timeout: 8_000 }).catch(() => undefined);
  await page
    .waitForFunction(() => ![...document.querySelectorAll("main p, main div")].some((n) => n.childElementCount === 0 && /^Loading/.test(n.textContent ?? "")), undefined, { timeout: 15_000 })
    .catch(() => undefined);
}

const shotName = (role: string, width: Width, path: string) => `${width}-${role}-${path.replace(/^\//, "").replace(/[0-9a-f]{8}-[0-9a-f-]{27}/g, "id").replace(/\//g, "_") || "home"}`;

async function contextFor(role: Role | null, width: Width): Promise<BrowserContext> {
  const ctx = await browser.newContext({ ...WIDTHS[width] });
  if (role) {
    const [name, value] = (await signIn(DEMO[role])).split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
  }
  return ctx;
}

type Problem = { page: string; what: string };

async function visitAll(role: Role | null, width: Width, paths: string[], opts: { axe: boolean; overflow: boolean; shots: boolean }): Promise<Problem[]> {
  const ctx = await contextFor(role, width);
  const page = await ctx.newPage();
  page.setDefaultTimeout(30_000);
  const problems: Problem[] = [];
  try {
    for (const path of paths) {
      const res = await page.goto(`${appUrl()}${path}`, { waitUntil: "domcontentloaded" });
      expect(res?.status(), `${path} as ${role}`).toBeLessThan(400);
      await settle(page);
      if (opts.overflow) {
        const { scrollWidth, innerWidth } = await page.evaluate(() => ({ scrollWidth: document.scrollingElement!.scrollWidth, innerWidth: window.innerWidth }));
        if (scrollWidth > innerWidth) problems.push({ page: path, what: `scrolls sideways: ${scrollWidth} px wide in a ${innerWidth} px window` });
      }
      if (opts.axe) {
        const found: AxeFinding[] = await axeViolations(page);
        for (const v of found) problems.push({ page: path, what: `${v.impact} ${v.id}: ${v.help}\n      ${v.nodes.join("\n      ")}` });
      }
      if (opts.shots) await screenshot(page, shotName(role ?? "signed-out", width, path));
    }
  } finally {
    await ctx.close();
  }
  return problems;
}

const report = (ps: Problem[]) => ps.map((p) => `${p.page}: ${p.what}`).join("\n");
const ROLES: Role[] = ["technician", "furnace_operator", "machinist", "manager", "admin"];

describe("every page at phone, tablet and desktop widths", () => {
  it("the signed-out pages", async () => {
    const paths = ["/sign-in", "/forgot-password"];
    const phone = await visitAll(null, "phone", paths, { axe: true, overflow: true, shots: true });
    const desktop = await visitAll(null, "desktop", paths, { axe: true, overflow: false, shots: true });
    expect(report([...phone, ...desktop])).toBe("");
  });

  for (const role of ROLES) {
    it(`${role}: no sideways scroll and no serious axe violation on a phone`, async () => {
      expect(report(await visitAll(role, "phone", pagesFor(role), { axe: true, overflow: true, shots: true }))).toBe("");
    }, 600_000);
    it(`${role}: no serious axe violation on a desktop, and the tablet view`, async () => {
      const desktop = await visitAll(role, "desktop", pagesFor(role), { axe: true, overflow: false, shots: role === "admin" || role === "furnace_operator" });
      const tablet = await visitAll(role, "tablet", pagesFor(role).filter((p) => !p.startsWith("/setup/")), { axe: false, overflow: true, shots: role !== "manager" });
      expect(report([...desktop, ...tablet])).toBe("");
    }, 600_000);
  }
});
