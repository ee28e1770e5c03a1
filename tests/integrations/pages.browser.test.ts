// The integration pages at a phone and a desktop width, with touch and mouse: no sideways scroll on
// the phone, no serious or critical axe-core WCAG 2.x A/AA violation, and the API reference's
// entries open with the keyboard.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { axeViolations } from "../helpers/axe";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";
import { WIDTHS, type Width } from "../helpers/viewports";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function check(role: "admin" | "manager", width: Width, path: string) {
  const ctx = await browser.newContext({ ...WIDTHS[width] });
  const [name, value] = (await signIn(DEMO[role])).split("=");
  await ctx.addCookies([{ name, value, url: appUrl() }]);
  const page = await ctx.newPage();
  try {
    const res = await page.goto(`${appUrl()}${path}`, { waitUntil: "domcontentloaded" });
    expect(res?.status(), path).toBe(200);
    await page.waitForLoadState("networkidle", { timeout: 8_000 }).catch(() => undefined);
    const { scrollWidth, innerWidth } = await page.evaluate(() => ({ scrollWidth: document.scrollingElement!.scrollWidth, innerWidth: window.innerWidth }));
    const problems = (await axeViolations(page)).map((v) => `${v.impact} ${v.id}: ${v.help} ${v.nodes.join(" | ")}`);
    if (scrollWidth > innerWidth) problems.push(`scrolls sideways: ${scrollWidth} px in ${innerWidth} px`);
    await screenshot(page, `${width}-${role}-${path.replace(/\W+/g, "_")}`);
    return { page, problems, close: () => ctx.close() };
  } catch (err) {
    await ctx.close();
    throw err;
  }
}

describe("integration pages", () => {
  for (const width of ["phone", "desktop"] as const) {
    for (const [role, path] of [["admin", "/setup/api"], ["admin", "/setup/tokens"], ["admin", "/setup/webhooks"], ["manager", "/activity"]] as const) {
      it(`${path} as ${role} at ${width} width`, async () => {
        const { problems, close } = await check(role, width, path);
        await close();
        expect(problems.join("\n")).toBe("");
      }, 120_000);
    }
  }

  it("/activity on a phone folds its filters behind a button that names the active ones; it opens by keyboard and touch", async () => {
    const { page, close } = await check("manager", "phone", "/activity?entity=build&user=ada");
    try {
      const toggle = page.getByRole("button", { name: /^Filters/ });
      expect(await toggle.getAttribute("aria-expanded")).toBe("false");
      expect(await toggle.innerText()).toMatch(/Filters \(2\)[\s\S]*Record type: Build · Person: ada/);
      const box = (await toggle.boundingBox())!;
      expect(box.height).toBeGreaterThanOrEqual(44);
      const form = page.getByRole("form", { name: "Filter the activity" });
      expect(await form.isVisible()).toBe(false);
      // The first event is on the first screen, not below the form.
      const firstEvent = (await page.getByTestId("activity-events").boundingBox())!;
      expect(firstEvent.y).toBeLessThan(844);
      await toggle.focus();
      await page.keyboard.press("Enter");
      expect(await toggle.getAttribute("aria-expanded")).toBe("true");
      expect(await form.isVisible()).toBe(true);
      expect(await page.getByLabel("Person (name or e-mail)").inputValue()).toBe("ada");
      expect((await axeViolations(page)).map((v) => v.id)).toEqual([]);
      await screenshot(page, "phone-manager-activity-filters-open");
      await toggle.tap();
      expect(await form.isVisible()).toBe(false);
    } finally {
      await close();
    }
  }, 120_000);

  it("/activity at tablet and desktop widths shows the filter form with no fold", async () => {
    for (const width of ["tablet", "desktop"] as const) {
      const { page, problems, close } = await check("manager", width, "/activity");
      try {
        expect(problems.join("\n")).toBe("");
        expect(await page.getByRole("form", { name: "Filter the activity" }).isVisible()).toBe(true);
        expect(await page.getByRole("button", { name: /^Filters/ }).isVisible()).toBe(false);
      } finally {
        await close();
      }
    }
  }, 120_000);

  it("the API reference opens an operation from the keyboard and shows its body fields", async () => {
    const { page, close } = await check("admin", "desktop", "/setup/api");
    try {
      const summary = page.locator("#postOrders > summary");
      await summary.focus();
      await page.keyboard.press("Enter");
      const details = page.locator("#postOrders");
      expect(await details.getAttribute("open")).not.toBeNull();
      const text = await details.innerText();
      expect(text).toContain("customer");
      expect(text).toContain("orders:write");
      // an open entry is still free of serious violations
      expect((await axeViolations(page)).map((v) => v.id)).toEqual([]);
    } finally {
      await close();
    }
  }, 120_000);
});
