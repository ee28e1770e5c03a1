import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { makeFurnace, makeProfileAndMaterial, makeUnits, profileId, retireEquipment, retireMaterials, staffAroundTheClock } from "../batches/fixtures";
import { WIDTHS } from "../helpers/viewports";

// At the machines: a traveler's address opens after sign-in, a furnace operator loads a run on a
// phone by typing traveler codes with the tally, and a finger drags a unit onto a run on a tablet.

const { db, close } = testDb();
let browser: Browser;
let restoreHours: () => Promise<void>;
const furnaces: string[] = [];
const materials: string[] = [];
let mine: { profile_id: string; material_code: string };
let other: { profile_id: string; material_code: string };
let operator: string;

beforeAll(async () => {
  browser = await launchBrowser();
  restoreHours = await staffAroundTheClock(db);
  mine = await makeProfileAndMaterial(db, "17-4PH");
  other = await makeProfileAndMaterial(db, "H13");
  materials.push(mine.material_code, other.material_code);
  const f = await makeFurnace(db, { profiles: [mine.profile_id, other.profile_id, await profileId(db, "316L-std")], tray: [300, 250], trays: 2, height: 100, load: 5000 });
  furnaces.push(f.id);
  operator = await signIn(DEMO.furnace_operator);
});

afterAll(async () => {
  await browser?.close();
  await db.updateTable("furnace_runs").set({ state: "cancelled" }).where("furnace_id", "in", furnaces).where("state", "in", ["draft", "scheduled"]).execute();
  await retireEquipment(db, furnaces, []);
  await retireMaterials(db, materials);
  await restoreHours();
  await close();
});

async function openRun(): Promise<{ id: string; version: number; code: string }> {
  const res = await api("/api/furnace-runs", { method: "POST", cookie: operator, body: { furnace_id: furnaces[0], profile_id: mine.profile_id } });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body;
}

async function addToRun(run: { id: string; version: number }, unit: { id: string; version: number }) {
  const res = await api(`/api/furnace-runs/${run.id}/units`, { method: "POST", cookie: operator, body: { version: run.version, unit_id: unit.id, unit_version: unit.version } });
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return res.body as { id: string; version: number };
}

const tally = (page: Page, key: string) => page.locator(`[data-tally="${key}"]`).textContent();

describe("at the machines, on a phone", () => {
  it("a scanned traveler address asks for sign-in and then lands on it, with the next step for the role", async () => {
    const build = await db.selectFrom("builds").select(["id", "code"]).where("state", "=", "scheduled").orderBy("code").executeTakeFirstOrThrow();
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    // The traveler's QR code holds APP_URL + /builds/<id> (app/api/builds/[id]/traveler/route.ts).
    await page.goto(`${appUrl()}/builds/${build.id}`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    expect(new URL(page.url()).searchParams.get("next")).toBe(`/builds/${build.id}`);
    await page.getByLabel("E-mail").fill(DEMO.technician);
    await page.getByLabel("Password").fill("hearth-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => u.pathname === `/builds/${build.id}`);
    const card = page.getByTestId("next-step-card");
    await card.waitFor();
    expect(await card.textContent()).toContain(build.code);
    expect(await page.getByTestId("next-step").textContent()).toBe("Start build");
    const box = (await page.getByTestId("next-step").boundingBox())!;
    expect(box.height).toBeGreaterThanOrEqual(44);
    await screenshot(page, "phone-technician-scanned-build");

    // A typed code from the traveler opens the unit, with where it is and the menu one tap away.
    const unit = await db.selectFrom("units").select(["id", "serial"]).where("build_id", "=", build.id).orderBy("serial").executeTakeFirstOrThrow();
    await page.getByTestId("menu-button").click();
    expect(await page.getByTestId("menu-button").getAttribute("aria-expanded")).toBe("true");
    await page.getByRole("dialog", { name: "Menu" }).getByRole("link", { name: "Scan" }).click();
    await page.waitForURL(/\/scan$/);
    expect(await page.getByTestId("menu-button").getAttribute("aria-expanded")).toBe("false");
    await page.getByTestId("code-input").fill(unit.serial.toLowerCase());
    await page.getByRole("button", { name: "Open" }).click();
    await page.waitForURL((u) => u.pathname === `/units/${unit.id}`);
    await page.getByTestId("where").waitFor();
    expect(await page.getByTestId("where").textContent()).toContain(build.code);
    await ctx.close();
  });

  it("the menu drawer: Escape closes it and gives focus back to its button", async () => {
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const [name, value] = operator.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    await page.goto(`${appUrl()}/scan`);
    expect(await page.getByRole("navigation", { name: "Main" }).count()).toBe(0);
    await page.getByTestId("menu-button").click();
    const dialog = page.getByRole("dialog", { name: "Menu" });
    await dialog.waitFor();
    expect(await page.evaluate(() => document.activeElement?.closest("[role=dialog]") !== null)).toBe(true);
    await page.keyboard.press("Escape");
    await dialog.waitFor({ state: "detached" });
    expect(await page.evaluate(() => document.activeElement?.getAttribute("data-testid"))).toBe("menu-button");
    // Without a camera (headless Chromium has none), the page says why and keeps typed entry.
    await page.getByTestId("camera-start").click();
    await page.getByTestId("camera-problem").waitFor();
    expect(await page.getByTestId("camera-problem").textContent()).toMatch(/camera|Type the code/);
    await ctx.close();
  });

  it("a furnace operator loads a run by typing traveler codes, with the running tally and refusals", async () => {
    const [a, b, c] = await makeUnits(db, { material: mine.material_code, state: "brown", count: 3, green: [60, 50, 30], mass_g: 300 });
    const [wrong] = await makeUnits(db, { material: other.material_code, state: "brown", green: [60, 50, 30], mass_g: 300 });
    let run = await openRun();
    run = { ...run, ...(await addToRun(run, a)) };
    run = { ...run, ...(await addToRun(run, b)) };

    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const [name, value] = operator.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    await page.goto(`${appUrl()}/furnace-runs/${run.id}`);
    await page.getByRole("link", { name: /Load by scanning/ }).click();
    await page.waitForURL((u) => u.pathname === "/scan" && u.searchParams.get("run") === run.id);
    await page.getByTestId("tally").waitFor();
    expect(await tally(page, "expected")).toBe("2");
    expect(await tally(page, "missing")).toBe("2");

    const enter = async (code: string) => {
      const last = page.getByTestId("load-last");
      const scansBefore = await page.evaluate((key) => (JSON.parse(sessionStorage.getItem(key) ?? "{}").scans ?? []).length, `hearth:load-run:${run.id}`);
      const button = page.getByRole("button", { name: "Load", exact: true });
      await expect
        .poll(async () => {
          await page.getByTestId("code-input").fill(code);
          return button.isEnabled();
        }, { timeout: 20_000 })
        .toBe(true);
      await button.click();
      await expect
        .poll(async () => page.evaluate((key) => (JSON.parse(sessionStorage.getItem(key) ?? "{}").scans ?? []).length, `hearth:load-run:${run.id}`), { timeout: 20_000 })
        .toBeGreaterThan(scansBefore);
      await expect.poll(async () => button.isDisabled(), { timeout: 20_000 }).toBe(true); // empty field again
      return last.textContent();
    };

    expect(await enter(a.serial)).toContain(`${a.serial} ticked off`);
    expect([await tally(page, "loaded"), await tally(page, "missing")]).toEqual(["1", "1"]);
    expect(await enter(c.serial)).toContain(`${c.serial} added to ${run.code}`);
    expect(await enter(wrong.serial)).toMatch(new RegExp(`${wrong.serial} not loaded: .*profile`));
    // A refused unit is not an unexpected unit on the run: it is counted apart, with its reason.
    expect(await page.getByTestId("refused-list").textContent()).toMatch(new RegExp(`${wrong.serial} .*profile`));
    expect(await page.getByTestId("unexpected-list").textContent()).not.toContain(wrong.serial);
    expect(await enter(b.serial)).toContain("ticked off");
    expect(await tally(page, "loaded")).toBe("3");
    expect(await tally(page, "missing")).toBe("0");
    expect(await tally(page, "unexpected")).toBe("1");
    expect(await tally(page, "refused")).toBe("1");
    expect(await page.getByTestId("unexpected-list").textContent()).toContain(c.serial);
    // A code the server does not know is refused too, with the server's reason, and loads nothing.
    expect(await enter("NO-SUCH-UNIT-1")).toContain("not loaded");
    expect(await tally(page, "unexpected")).toBe("1");
    expect(await tally(page, "refused")).toBe("2");
    const unknown = page.locator('[data-refused="NO-SUCH-UNIT-1"]');
    expect((await unknown.textContent())!.replace("NO-SUCH-UNIT-1", "").trim().length).toBeGreaterThan(0);
    await screenshot(page, "phone-furnace-operator-load-run");

    const onRun = await db.selectFrom("units").select("serial").where("furnace_run_id", "=", run.id).orderBy("serial").execute();
    expect(onRun.map((u) => u.serial)).toEqual([a.serial, b.serial, c.serial].sort());
    expect((await db.selectFrom("units").select("furnace_run_id").where("id", "=", wrong.id).executeTakeFirstOrThrow()).furnace_run_id).toBeNull();
    const scroll = await page.evaluate(() => document.scrollingElement!.scrollWidth - window.innerWidth);
    expect(scroll).toBeLessThanOrEqual(0);
    await ctx.close();
  });
});

describe("the furnace run page on a 390 × 844 touch screen", () => {
  it("puts the operator's next action on the first screen, with a caution line above it and the full cautions kept on the page", async () => {
    const [a] = await makeUnits(db, { material: mine.material_code, state: "brown", green: [60, 50, 30], mass_g: 300 });
    const run = await openRun();
    await addToRun(run, a);
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const [name, value] = operator.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    try {
      await page.goto(`${appUrl()}/furnace-runs/${run.id}`);
      const start = page.getByTestId("loading-checklist").getByRole("button", { name: /Start run/ });
      await start.waitFor();
      await screenshot(page, "phone-furnace-operator-run-first-screen");
      const fold = 844;
      const startBox = (await start.boundingBox())!;
      expect(startBox.y + startBox.height, "the start button ends within the first screen").toBeLessThanOrEqual(fold);
      expect(startBox.height).toBeGreaterThanOrEqual(44);
      const line = (await page.getByTestId("caution-line").boundingBox())!;
      expect(line.y + line.height).toBeLessThanOrEqual(startBox.y);
      expect(await page.getByTestId("caution-line").textContent()).toMatch(/NFPA 86.*licensed practice/);
      // The full list is still on the page, after the work, with its deference to the maker, codes and standards.
      const cautions = page.getByTestId("cautions");
      const full = (await cautions.textContent())!;
      expect(full).toContain("NFPA 86");
      expect(full).toContain("NFPA 484");
      expect(full).toContain("The equipment maker's instructions, local codes and licensed practice come first");
      expect((await cautions.locator("[data-caution]").count())).toBeGreaterThan(2);
      expect((await cautions.boundingBox())!.y).toBeGreaterThan(startBox.y);
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
    } finally {
      await ctx.close();
    }
  });
});

describe("touch on the batching board", () => {
  it("a press-and-hold drag with a finger puts a unit on a run, on a tablet", async () => {
    const [u] = await makeUnits(db, { material: mine.material_code, state: "brown", green: [60, 50, 30], mass_g: 300 });
    const run = await openRun();
    const ctx = await browser.newContext({ ...WIDTHS.tablet });
    const [name, value] = operator.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    await page.goto(`${appUrl()}/batches`);
    const filter = page.getByLabel("Filter by material");
    await filter.selectOption((await filter.locator("option", { hasText: mine.material_code }).getAttribute("value"))!);
    const card = page.getByTestId("waiting-furnace").locator(`[data-unit-id="${u.id}"]`);
    await card.waitFor();
    const target = page.locator(`[data-target-id="run:${run.id}"]`);
    await target.waitFor();
    await screenshot(page, "tablet-furnace-operator-board");
    await target.scrollIntoViewIfNeeded();
    // Beside the list at this width: the waiting list stays in view while the targets scroll.
    const a = (await card.boundingBox())!;
    const b = (await target.boundingBox())!;
    expect(b.x).toBeGreaterThan(a.x + a.width - 1);
    expect(a.y + a.height).toBeLessThanOrEqual(1180);

    const cdp = await ctx.newCDPSession(page);
    const touch = (type: "touchStart" | "touchMove" | "touchEnd", x: number, y: number) =>
      cdp.send("Input.dispatchTouchEvent", { type, touchPoints: type === "touchEnd" ? [] : [{ x, y, radiusX: 4, radiusY: 4, force: 1, id: 1 }] });
    const from = { x: a.x + 20, y: a.y + 12 };
    const to = { x: b.x + b.width / 2, y: b.y + Math.min(60, b.height / 2) };
    await touch("touchStart", from.x, from.y);
    await page.waitForTimeout(400); // longer than the 250 ms press-and-hold
    for (let i = 1; i <= 15; i++) await touch("touchMove", from.x + ((to.x - from.x) * i) / 15, from.y + ((to.y - from.y) * i) / 15);
    await target.getByTestId("drop-verdict").waitFor({ timeout: 10_000 });
    expect(await target.getByTestId("drop-verdict").textContent()).toContain("fits here");
    // No full-page screenshot mid-drag: it resizes the window, and a resize cancels a drag.
    await touch("touchEnd", to.x, to.y);
    await expect.poll(async () => (await db.selectFrom("units").select("furnace_run_id").where("id", "=", u.id).executeTakeFirstOrThrow()).furnace_run_id, { timeout: 15_000 }).toBe(run.id);
    await screenshot(page, "tablet-furnace-operator-touch-drop");
    await ctx.close();
  });

  it("a quick swipe over a card scrolls and moves nothing", async () => {
    const [u] = await makeUnits(db, { material: mine.material_code, state: "brown", green: [60, 50, 30], mass_g: 300 });
    await openRun();
    const ctx = await browser.newContext({ ...WIDTHS.tablet });
    const [name, value] = operator.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    await page.goto(`${appUrl()}/batches`);
    const filter = page.getByLabel("Filter by material");
    await filter.selectOption((await filter.locator("option", { hasText: mine.material_code }).getAttribute("value"))!);
    const card = page.getByTestId("waiting-furnace").locator(`[data-unit-id="${u.id}"]`);
    await card.waitFor();
    const a = (await card.boundingBox())!;
    const cdp = await ctx.newCDPSession(page);
    await cdp.send("Input.dispatchTouchEvent", { type: "touchStart", touchPoints: [{ x: a.x + 20, y: a.y + 12, id: 1 }] });
    for (let i = 1; i <= 5; i++) await cdp.send("Input.dispatchTouchEvent", { type: "touchMove", touchPoints: [{ x: a.x + 20 + i * 40, y: a.y + 12, id: 1 }] });
    await cdp.send("Input.dispatchTouchEvent", { type: "touchEnd", touchPoints: [] });
    await page.waitForTimeout(500);
    expect(await page.getByTestId("drop-verdict").count()).toBe(0);
    expect((await db.selectFrom("units").select("furnace_run_id").where("id", "=", u.id).executeTakeFirstOrThrow()).furnace_run_id).toBeNull();
    await ctx.close();
  });
});
