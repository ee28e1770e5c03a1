import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { api, DEMO, signIn } from "../helpers/session";
import { hoursFromNow, makeBuild, makeOrder, makePart, makePrinter, retirePrinters, uniq, unitsOf } from "../floor/fixtures";

// A technician receives a lot and releases it, a build prints from it, the shelf and the
// projection show the draw; a manager recalls the lot from a phone.

const { db, close } = testDb();
let browser: Browser;
const printers: string[] = [];

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await retirePrinters(db, printers);
  await close();
});

async function signInAs(page: Page, email: string) {
  await page.goto(`${appUrl()}/sign-in?next=/inventory`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("hearth-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  // the sign-in address itself ends in "/inventory" (?next=): wait for the page, not the query
  await page.waitForURL((u) => u.pathname === "/inventory", { timeout: 60_000 });
}

describe("feedstock in the browser", () => {
  it("receives and releases a lot, shows the draw of a build, and recalls the lot on a phone", async () => {
    const code = uniq("BF");
    const src = await db.selectFrom("materials").selectAll().where("code", "=", "316L").executeTakeFirstOrThrow();
    const { id: _i, created_at: _c, updated_at: _u, version: _v, reorder_alerted_at: _r, ...rest } = src;
    const material = await db.insertInto("materials").values({ ...rest, code, name: `browser feedstock ${code}`, reorder_point_g: 1000 }).returning("id").executeTakeFirstOrThrow();
    const printer = await makePrinter(db, { materials: [code], build: [400, 400, 300], rate: 40 });
    printers.push(printer.id);
    const supplierLot = uniq("BRW");

    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } });
    await signInAs(page, DEMO.technician);
    const receive = page.getByRole("region", { name: "Receive feedstock" }).or(page.locator("section[aria-labelledby=receive-heading]"));
    await receive.getByLabel("Material").selectOption(material.id);
    await receive.getByLabel("Supplier", { exact: true }).fill("Browser Powders");
    await receive.getByLabel("Supplier's lot number").fill(supplierLot);
    await receive.getByLabel("Quantity (kg)").fill("4");
    await receive.getByRole("button", { name: "Receive into quarantine" }).click();
    const status = receive.getByRole("status");
    await expect.poll(() => status.textContent(), { timeout: 20_000 }).toMatch(/Received as FL-\d{5}/);
    const lotCode = (await status.textContent())!.match(/FL-\d{5}/)![0];
    const lot = await db.selectFrom("feedstock_lots").select(["id"]).where("code", "=", lotCode).executeTakeFirstOrThrow();
    await screenshot(page, "inventory-received");

    await page.getByRole("link", { name: lotCode }).click();
    await page.waitForURL(new RegExp(`/inventory/${lot.id}$`));
    await page.getByRole("button", { name: "Release for printing" }).click();
    await expect.poll(() => page.getByLabel("Lot facts").textContent(), { timeout: 20_000 }).toMatch(/Released/);

    // a build of this material prints from the lot
    const tech = await signIn(DEMO.technician);
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: code, quantity: 2 });
    const build = await makeBuild(tech, (await unitsOf(db, part.id)).map((u) => u.id));
    const s = await api(`/api/builds/${build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: build.version, printer_id: printer.id, starts_at: hoursFromNow(-0.2).toISOString() } });
    expect(s.status).toBe(200);
    await page.goto(`${appUrl()}/builds/${build.id}`);
    await page.getByLabel("Print from lot").selectOption(lot.id);
    await expect.poll(() => page.locator("section[aria-labelledby=feedstock-heading]").getByRole("status").textContent(), { timeout: 20_000 }).toMatch(/Lot chosen/);
    const fresh = await api(`/api/builds/${build.id}`, { cookie: tech });
    const started = await api(`/api/builds/${build.id}/actions`, { method: "POST", cookie: tech, body: { action: "start", version: fresh.body.build.version } });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
    const drawn = Number((await db.selectFrom("feedstock_draws").select("drawn_g").where("build_id", "=", build.id).executeTakeFirstOrThrow()).drawn_g);
    expect(drawn).toBeGreaterThan(0);

    await page.goto(`${appUrl()}/inventory`);
    const row = page.locator("tr", { has: page.getByRole("link", { name: lotCode }) });
    const left = ((4000 - drawn) / 1000).toLocaleString("en-GB", { minimumFractionDigits: 1, maximumFractionDigits: 1 });
    expect(await row.textContent()).toContain(`${left} kg of 4.0 kg`);
    await page.getByRole("button", { name: code, exact: true }).click();
    // a flat projection draws a line of no height, which Playwright counts as hidden: attached is enough
    await page.locator(".recharts-line-curve").first().waitFor({ state: "attached" });
    expect(await page.getByRole("img", { name: new RegExp(`Projected ${code} on hand`) }).count()).toBe(1);
    await screenshot(page, "inventory-after-draw");
    await page.close();

    // the manager recalls the lot from a phone
    const phone = await browser.newPage({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    await signInAs(phone, DEMO.manager);
    await phone.goto(`${appUrl()}/inventory/${lot.id}`);
    phone.once("dialog", (d) => void d.accept());
    await phone.getByLabel(/Recall: the reason/).fill("supplier notice 88");
    await phone.getByRole("button", { name: "Recall this lot" }).click();
    await expect.poll(() => phone.locator("section[aria-labelledby=actions-heading]").getByRole("status").textContent(), { timeout: 20_000 }).toMatch(/2 units put on hold/);
    expect(await phone.evaluate(() => document.scrollingElement!.scrollWidth <= window.innerWidth + 1)).toBe(true);
    await screenshot(phone, "inventory-recall-phone");
    const held = await db.selectFrom("units").select("state").where("part_id", "=", part.id).execute();
    expect(held.map((u) => u.state)).toEqual(["on_hold", "on_hold"]);
  });
});
