import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO } from "../helpers/session";
import { makeOrder, makePart, makeUnit, tag } from "../finishing/fixtures";

// A manager opens /capacity and sees a late order with its projected completion, the charts,
// and makes calendar feed addresses.

const { db, close } = testDb();
let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await close();
});

describe("capacity in the browser", () => {
  it("shows a late order, the utilization charts and the calendar feeds", async () => {
    const t = tag();
    const material = await db.selectFrom("materials").select("id").where("code", "=", "316L").executeTakeFirstOrThrow();
    // due yesterday, not yet printed: nothing can make it on time
    const order = await makeOrder(db, `WO-LB${t}`, new Date(Date.now() - 86_400_000), `Late browser customer ${t}`);
    const part = await makePart(db, order.id, material.id, `LB-${t}`);
    await makeUnit(db, part.id, `${order.code}-01`, "planned");

    const page = await browser.newPage({ viewport: { width: 1500, height: 1000 } });
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill(DEMO.manager);
    await page.getByLabel("Password").fill("hearth-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/capacity$/, { timeout: 60_000 });

    const row = page.locator(`[data-testid="orders-at-risk"] tr[data-order="${order.code}"]`);
    await row.waitFor();
    expect(await row.locator("[data-risk]").getAttribute("data-risk")).toBe("late");
    expect(await row.textContent()).toContain(`Late browser customer ${t}`);
    expect(await row.textContent()).toMatch(/over/);
    // charts drew: one line per printer on the day chart
    // attached, not visible: a printer with no booked hours draws a line of zero height, which
    // the browser reports as hidden
    await page.getByTestId("utilization-printer").locator(".recharts-line").first().waitFor({ state: "attached" });
    expect(await page.getByTestId("utilization-printer").locator(".recharts-line").count()).toBeGreaterThanOrEqual(2);
    await page.getByTestId("wip").locator(".recharts-bar-rectangle").first().waitFor();
    await screenshot(page, "capacity-manager");

    await page.getByRole("radio", { name: "per week" }).click();
    await page.getByTestId("utilization-printer").locator(".recharts-bar-rectangle").first().waitFor();

    const feeds = page.getByTestId("calendar-feeds");
    await feeds.getByRole("button", { name: /Make (new|feed) addresses/ }).click();
    await feeds.getByTestId("calendar-urls").waitFor();
    const first = await feeds.locator("code").first().textContent();
    expect(first).toMatch(/\/api\/calendar\/feeds\/[A-Za-z0-9_-]{43}\/[0-9a-f-]{36}\.ics$/);
    const ics = await fetch(first!);
    expect(ics.status).toBe(200);
    expect((await ics.text()).startsWith("BEGIN:VCALENDAR")).toBe(true);
    await screenshot(page, "capacity-calendar-feeds");
    await feeds.getByRole("button", { name: "Revoke" }).click();
    await feeds.getByTestId("calendar-status").getByText("You have no feed addresses.").waitFor();
    expect((await fetch(first!)).status).toBe(404);
    await page.close();
  });
});
