import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";
import { WIDTHS, type Width } from "../helpers/viewports";

// The calibration page's controls a finger uses: the material tabs and the unit links in the
// latest-measurements table are at least 44 × 44 CSS px on touch screens (WCAG 2.2, success
// criterion 2.5.5 "Target Size (Enhanced)"), while a desktop keeps its compact table rows.

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function boxes(width: Width) {
  const ctx = await browser.newContext({ ...WIDTHS[width] });
  const [name, value] = (await signIn(DEMO.technician)).split("=");
  await ctx.addCookies([{ name, value, url: appUrl() }]);
  const page = await ctx.newPage();
  page.setDefaultTimeout(60_000);
  await page.goto(`${appUrl()}/finishing/calibration`);
  await page.getByTestId("calibration-recent").waitFor();
  const measure = async (selector: string) => Promise.all((await page.locator(selector).all()).map(async (l) => (await l.boundingBox())!));
  const tabs = await measure('[role="tablist"][aria-label="Material"] [role="tab"]');
  const units = await measure('[data-testid="calibration-recent"] a');
  await screenshot(page, `${width}-calibration-taps`);
  await ctx.close();
  return { tabs, units };
}

describe("calibration tap targets", () => {
  it("material tabs and unit links are at least 44 px each way at 390 px with touch", async () => {
    const { tabs, units } = await boxes("phone");
    expect(tabs.length).toBeGreaterThan(0);
    expect(units.length).toBeGreaterThan(0);
    for (const b of [...tabs, ...units]) {
      expect(b.height).toBeGreaterThanOrEqual(44);
      expect(b.width).toBeGreaterThanOrEqual(44);
    }
  });

  it("on a desktop with a mouse the unit links stay text-sized", async () => {
    const { units } = await boxes("desktop");
    expect(units.length).toBeGreaterThan(0);
    for (const b of units) expect(b.height).toBeLessThan(44);
  });
});
