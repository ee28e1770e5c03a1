import { readdirSync } from "node:fs";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { axeViolations, type AxeFinding } from "../helpers/axe";
import { smallTapTargets } from "../helpers/tap-targets";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { WIDTHS, type Width } from "../helpers/viewports";
import { can, navFor, type Role } from "@/lib/auth/permissions";

// Every page, for every role, at a phone, a tablet and a desktop width: no page scrolls sideways as a
// whole on the phone or the tablet (document.scrollingElement.scrollWidth ≤ innerWidth), and axe-core
// finds no serious or critical WCAG 2.x A/AA violation at any of the three widths, and every
// control on the two touch screens is a finger-sized target (tests/helpers/tap-targets.ts). One browser and
// one started app for all of it; a few contexts per role and width, visiting at once. The last check walks app/ and
// fails when a page there is visited by no role, so a new page cannot be left out.

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
    one(db.selectFrom("feedstock_lots").select("id").orderBy("code").executeTakeFirst(), "lot"),
  ]);
  // The demo shop has no quotes: a draft of this test's own, with one line of a demo part.
  const manager = await signIn(DEMO.manager);
  const made = await api<{ quote: { id: string; version: number } }>("/api/quotes", { method: "POST", cookie: manager, body: { customer: `Page check ${Date.now()}`, contact_email: "buyer@example.test" } });
  expect(made.status).toBe(201);
  ids.quote = made.body.quote.id;
  if (ids.part) {
    const line = await api(`/api/quotes/${ids.quote}/lines`, { method: "POST", cookie: manager, body: { version: made.body.quote.version, part_id: ids.part, quantity: 4 } });
    expect(line.status, JSON.stringify(line.body)).toBe(201);
  }
});

afterAll(async () => {
  await browser?.close();
  await close();
});

/** The pages a role can open: its navigation, its own settings, the record pages every role reads, and the scan page. */
function pagesFor(role: Role): string[] {
  const pages = navFor(role).map((n) => n.href);
  if (can(role, "setup:write")) pages.push("/setup/users", "/setup/equipment", "/setup/materials", "/setup/profiles", "/setup/settings", "/setup/quotes", "/setup/jobs", "/setup/tokens", "/setup/webhooks", "/setup/api");
  if (can(role, "users:admin")) pages.push("/setup/security");
  if (can(role, "shop:read")) pages.push("/finishing/calibration");
  pages.push("/settings");
  const records: [string, string, boolean][] = [
    ["unit", "/units/", true], ["build", "/builds/", true], ["run", "/furnace-runs/", true], ["wash", "/batches/wash/", true],
    ["part", "/parts/", true], ["finishing_unit", "/finishing/", true], ["lot", "/inventory/", true], ["quote", "/quotes/", can(role, "quotes:read")],
  ];
  for (const [key, prefix, allowed] of records) {
    if (allowed && ids[key]) pages.push(`${prefix}${ids[key]}`);
  }
  return [...new Set(pages)];
}

/** The pages nobody needs to be signed in for ("/" sends a stranger to the sign-in page). */
const SIGNED_OUT = ["/sign-in", "/forgot-password", "/set-password?token=not-a-link-anyone-was-sent", "/forbidden", "/"];

/** Every page in app/ as a route pattern: route groups dropped, "[id]" kept. */
function appPages(): string[] {
  const root = path.resolve(import.meta.dirname, "../../app");
  return (readdirSync(root, { recursive: true }) as string[])
    .filter((f) => path.basename(f) === "page.tsx")
    .map((f) => "/" + path.dirname(f).split(path.sep).filter((seg) => seg !== "." && !/^\(.*\)$/.test(seg)).join("/"));
}

/**
 * Requests in flight on a page, leaving out the live event stream: it stays open as long as the
 * page does, so Playwright's "networkidle" never comes on a live page and would cost its whole
 * timeout on each of them.
 */
function trackRequests(page: Page): () => number {
  const open = new Set<unknown>();
  const counts = (url: string) => !url.includes("/api/events");
  page.on("request", (r) => counts(r.url()) && open.add(r));
  page.on("requestfinished", (r) => open.delete(r));
  page.on("requestfailed", (r) => open.delete(r));
  return () => open.size;
}

/** Waits until the page's client data has arrived: no request in flight for 500 ms and no "Loading" line left. */
async function settle(page: Page, inFlight: () => number) {
  await page.waitForLoadState("load", { timeout: 15_000 }).catch(() => undefined);
  const until = Date.now() + 8_000;
  let quietSince = Date.now();
  while (Date.now() < until) {
    if (inFlight() > 0) quietSince = Date.now();
    else if (Date.now() - quietSince >= 500) break;
    await page.waitForTimeout(50);
  }
  await page
    .waitForFunction(() => ![...document.querySelectorAll("main p, main div")].some((n) => n.childElementCount === 0 && /^Loading/.test(n.textContent ?? "")), undefined, { timeout: 15_000 })
    .catch(() => undefined);
}

const shotName = (role: string, width: Width, path: string) => `${width}-${role}-${path.replace(/\?.*$/, "").replace(/^\//, "").replace(/[0-9a-f]{8}-[0-9a-f-]{27}/g, "id").replace(/\//g, "_") || "home"}`;

async function contextFor(role: Role | null, width: Width): Promise<BrowserContext> {
  const ctx = await browser.newContext({ ...WIDTHS[width] });
  if (role) {
    const [name, value] = (await signIn(DEMO[role])).split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
  }
  return ctx;
}

type Problem = { page: string; what: string };

async function visitLane(role: Role | null, width: Width, paths: string[], opts: { axe: boolean; overflow: boolean; shots: boolean }): Promise<Problem[]> {
  const ctx = await contextFor(role, width);
  const page = await ctx.newPage();
  page.setDefaultTimeout(30_000);
  const inFlight = trackRequests(page);
  const problems: Problem[] = [];
  try {
    for (const path of paths) {
      const res = await page.goto(`${appUrl()}${path}`, { waitUntil: "domcontentloaded" });
      expect(res?.status(), `${path} as ${role}`).toBeLessThan(400);
      await settle(page, inFlight);
      if (opts.overflow) {
        const { scrollWidth, innerWidth } = await page.evaluate(() => ({ scrollWidth: document.scrollingElement!.scrollWidth, innerWidth: window.innerWidth }));
        if (scrollWidth > innerWidth) problems.push({ page: path, what: `scrolls sideways: ${scrollWidth} px wide in a ${innerWidth} px window` });
      }
      if (opts.overflow) {
        for (const t of await smallTapTargets(page)) problems.push({ page: path, what: `tap target under 44 px: ${t}` });
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

/**
 * Visits the pages in LANES tabs at once, each in its own context: most of a visit is waiting
 * (the page's data, then half a second of quiet), which the other tabs fill.
 */
const LANES = 3;
async function visitAll(role: Role | null, width: Width, paths: string[], opts: { axe: boolean; overflow: boolean; shots: boolean }): Promise<Problem[]> {
  const lanes = Array.from({ length: Math.min(LANES, paths.length) }, (_, k) => paths.filter((_, i) => i % LANES === k));
  return (await Promise.all(lanes.map((lane) => visitLane(role, width, lane, opts)))).flat();
}

const report = (ps: Problem[]) => ps.map((p) => `${p.page}: ${p.what}`).join("\n");
const ROLES: Role[] = ["technician", "furnace_operator", "machinist", "manager", "admin"];

describe("every page at phone, tablet and desktop widths", () => {
  it("visits every page in app/, each [id] page with a real record", () => {
    const visited = [...SIGNED_OUT, ...ROLES.flatMap(pagesFor)].map((p) => p.split("?")[0]);
    const missing = appPages().filter((pattern) => {
      const re = new RegExp(`^${pattern.replace(/\[[^\]]+\]/g, "[^/]+")}$`);
      return !visited.some((p) => re.test(p));
    });
    expect(missing).toEqual([]);
  });

  it("the signed-out pages", async () => {
    const phone = await visitAll(null, "phone", SIGNED_OUT, { axe: true, overflow: true, shots: true });
    const tablet = await visitAll(null, "tablet", SIGNED_OUT, { axe: true, overflow: true, shots: false });
    const desktop = await visitAll(null, "desktop", SIGNED_OUT, { axe: true, overflow: false, shots: true });
    expect(report([...phone, ...tablet, ...desktop])).toBe("");
  }, 120_000);

  for (const role of ROLES) {
    it(`${role}: no sideways scroll, no small tap target and no serious axe violation on a phone`, async () => {
      expect(report(await visitAll(role, "phone", pagesFor(role), { axe: true, overflow: true, shots: true }))).toBe("");
    }, 600_000);
    it(`${role}: no serious axe violation on a desktop, nor on a tablet, where no page scrolls sideways and no tap target is small either`, async () => {
      const desktop = await visitAll(role, "desktop", pagesFor(role), { axe: true, overflow: false, shots: role === "admin" || role === "furnace_operator" });
      const tablet = await visitAll(role, "tablet", pagesFor(role), { axe: true, overflow: true, shots: role !== "manager" });
      expect(report([...desktop, ...tablet])).toBe("");
    }, 900_000);
  }
});
