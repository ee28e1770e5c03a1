// The pages under the Content-Security-Policy that proxy.ts sends (scripts by per-request nonce
// only, no 'unsafe-inline' scripts): the floor with its early inline request, the batch board,
// the 3-D preview (three.js), the capacity charts (recharts) and a build's traveler PDF all load
// and work, and the browser reports no violation.
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { testDb } from "../helpers/db";
import { appUrl, launchBrowser } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";
import { boxMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { makeOrder, makePart } from "../floor/fixtures";

const { db, close } = testDb();
let browser: Browser;
let context: BrowserContext;
let admin: string;

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1400, height: 950 } });
  const [name, value] = admin.split("=");
  await context.addCookies([{ name, value, url: appUrl() }]);
  // Collected in the page before any of its scripts run.
  await context.addInitScript(() => {
    const w = window as unknown as { __csp: string[] };
    w.__csp = [];
    document.addEventListener("securitypolicyviolation", (e) => w.__csp.push(`${e.violatedDirective} ${e.blockedURI}`));
  });
});

afterAll(async () => {
  await browser?.close();
  await close();
});

async function open(url: string, ready: (page: Page) => Promise<unknown>) {
  const page = await context.newPage();
  const console: string[] = [];
  page.on("console", (m) => {
    if (m.type() === "error" && /Content Security Policy|Refused to/i.test(m.text())) console.push(m.text());
  });
  const res = await page.goto(`${appUrl()}${url}`);
  expect(res?.headers()["content-security-policy"]).toMatch(/'nonce-/);
  await ready(page);
  const violations = await page.evaluate(() => (window as unknown as { __csp: string[] }).__csp);
  expect([...violations, ...console], url).toEqual([]);
  return page;
}

describe("pages under the Content-Security-Policy", () => {
  it("the floor runs its early inline request and draws its lanes", async () => {
    const page = await open("/floor", (p) => p.locator(".fc-timeline-body, .fc-view").first().waitFor({ timeout: 30_000 }));
    // the nonce'd inline script ran: it left its early request for the board to take
    expect(await page.evaluate(() => "__hearthFloorOpening" in window)).toBe(true);
    await page.close();
  });

  it("the batch board, the capacity charts and the settings page hydrate", async () => {
    for (const [url, sel] of [["/batches", "main"], ["/capacity", ".recharts-wrapper, svg"], ["/settings", "[data-testid=open-sessions]"]] as const) {
      const page = await open(url, async (p) => {
        await p.locator(sel).first().waitFor({ timeout: 30_000 });
        await p.waitForLoadState("networkidle");
      });
      await page.close();
    }
  });

  it("the 3-D preview renders an uploaded STL", async () => {
    const order = await makeOrder(admin);
    const part = await makePart(admin, db, { order_id: order.id, material: "316L", size: [40, 30, 20] });
    const file = path.join(mkdtempSync(path.join(tmpdir(), "hearth-csp-")), "block.stl");
    writeFileSync(file, writeBinaryStl(boxMesh(40, 30, 20)));
    const page = await open(`/parts/${part.id}`, async (p) => {
      await p.getByTestId("stl-file").setInputFiles(file);
      await p.locator('[data-testid="analysis-status"][data-status="done"]').waitFor({ timeout: 30_000 });
      await p.locator('[data-testid="mesh-preview"][data-status="ready"]').waitFor({ timeout: 20_000 });
    });
    await page.close();
  });

  it("a build's traveler PDF opens", async () => {
    const build = await db.selectFrom("builds").select("id").limit(1).executeTakeFirst();
    if (!build) return;
    const page = await context.newPage();
    const res = await page.request.get(`${appUrl()}/api/builds/${build.id}/traveler`);
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toContain("application/pdf");
    expect(res.headers()["x-content-type-options"]).toBe("nosniff");
    await page.close();
  });
});
