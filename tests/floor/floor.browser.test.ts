import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { testDb } from "../helpers/db";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";
import { openingWeek } from "@/components/floor/opening-week";
import { addLocalDays, localDateOf, zonedParts, zonedTimeToUtc, type LocalDate } from "@/lib/process/time-zone";
import { api } from "../helpers/session";
import { makeDraftBuild, makePrinter, retirePrinters } from "./fixtures";
import { WIDTHS } from "../helpers/viewports";

// The floor in Chromium, signed in as a technician: drag an unscheduled build onto a printer
// lane, see it there after a reload, and see an overlapping drop refused with the reason; a
// finished build is a block in its lane's background that opens the build when clicked.
// Then the same floor in a browser whose clock is in another zone (Asia/Tokyo): the timeline,
// the now line and a drop all read the shop's zone (shop_settings.time_zone).

const { db, close } = testDb();
let browser: Browser;
let context: BrowserContext;
let tech: string;
let lane: { id: string; name: string };
let first: Awaited<ReturnType<typeof makeDraftBuild>>;
let second: Awaited<ReturnType<typeof makeDraftBuild>>;
let shopZone: string;

async function openNextWeek(page: Page, laneId = lane.id) {
  await page.goto(`${appUrl()}/floor`);
  await page.waitForSelector('[data-testid="floor-board"][data-ready="true"]');
  await page.click(".fc-next-button");
  await page.waitForFunction(() => document.querySelector('[data-testid="floor-board"]')?.getAttribute("data-ready") === "true");
  await page.waitForSelector(`.fc-timeline-lane[data-resource-id="${laneId}"]`);
}

/** Drags an element onto the printer lane at the start of the n-th time slot of the view. */
async function dragTo(page: Page, selector: string, slotIndex: number, opts: { drop?: boolean } = {}) {
  const source = await page.locator(selector).boundingBox();
  const laneBox = await page.locator(`.fc-timeline-lane[data-resource-id="${lane.id}"]`).first().boundingBox();
  const slot = await page.locator(".fc-timeline-slot-lane").nth(slotIndex).boundingBox();
  if (!source || !laneBox || !slot) throw new Error("floor elements not found");
  await page.mouse.move(source.x + source.width / 2, source.y + source.height / 2);
  await page.mouse.down();
  await page.mouse.move(source.x + source.width / 2 - 20, source.y + source.height / 2, { steps: 5 });
  await page.mouse.move(slot.x + 4, laneBox.y + laneBox.height / 2, { steps: 25 });
  await page.waitForTimeout(200);
  if (opts.drop !== false) await page.mouse.up();
}

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
  shopZone = (await db.selectFrom("shop_settings").select("time_zone").where("id", "=", 1).executeTakeFirstOrThrow()).time_zone;
  lane = await makePrinter(db, { materials: ["17-4PH"], build: [300, 250, 200], rate: 20, name: `AA-${Date.now().toString(36)}` });
  first = await makeDraftBuild(tech, db, { material: "17-4PH", quantity: 2, due: new Date(Date.now() - 86_400_000) });
  second = await makeDraftBuild(tech, db, { material: "17-4PH", due: new Date(Date.now() - 86_400_000) });
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1600, height: 1100 } });
  const [name, value] = tech.split("=");
  await context.addCookies([{ name, value, url: appUrl() }]);
});

afterAll(async () => {
  await browser?.close();
  await retirePrinters(db, [lane.id]);
  await close();
});

describe("the floor in a browser", () => {
  it("drags an unscheduled build onto a printer lane and finds it there after a reload", async () => {
    const page = await context.newPage();
    await openNextWeek(page);
    await page.waitForSelector(`[data-testid="unscheduled-${first.build.code}"]`);
    await dragTo(page, `[data-testid="unscheduled-${first.build.code}"]`, 9);
    const message = page.getByTestId("floor-message");
    await expect.poll(async () => message.getAttribute("data-tone"), { timeout: 15_000 }).toBe("success");
    expect(await message.textContent()).toContain(`${first.build.code} is booked on ${lane.name}`);
    await screenshot(page, "floor-after-drop");

    const row = await db.selectFrom("builds").select(["state", "printer_id", "starts_at"]).where("id", "=", first.build.id).executeTakeFirstOrThrow();
    expect(row.state).toBe("scheduled");
    expect(row.printer_id).toBe(lane.id);

    await page.reload();
    await openNextWeek(page);
    const booked = page.locator(`.fc-timeline-lane[data-resource-id="${lane.id}"] [data-event-id="${first.build.id}"]`);
    await booked.waitFor({ timeout: 15_000 });
    expect(await booked.textContent()).toContain(first.build.code);
    // Its state and unit count are drawn from data-detail; the tooltip carries the whole line.
    expect(await booked.getAttribute("data-detail")).toMatch(/^booked( · \d+ u)?$/);
    expect(await booked.getAttribute("title")).toContain(`${first.build.code}`);
    expect(await booked.evaluate((el) => getComputedStyle(el, "::after").content)).toMatch(/booked/);
    expect(await page.locator(`[data-testid="unscheduled-${first.build.code}"]`).count()).toBe(0);
    await screenshot(page, "floor-after-reload");
    await page.close();
  });

  it("refuses an overlapping drop with a message and leaves the build unscheduled", async () => {
    const page = await context.newPage();
    await openNextWeek(page);
    await page.waitForSelector(`[data-testid="unscheduled-${second.build.code}"]`);
    await dragTo(page, `[data-testid="unscheduled-${second.build.code}"]`, 9);
    const message = page.getByTestId("floor-message");
    await expect.poll(async () => message.getAttribute("data-tone"), { timeout: 15_000 }).toBe("danger");
    const text = (await message.textContent()) ?? "";
    expect(text).toContain("Refused");
    expect(text).toContain(first.build.code);
    await screenshot(page, "floor-overlap-refused");
    // snapped back: not on the lane, still in the list, still a draft
    expect(await page.locator(`.fc-timeline-lane[data-resource-id="${lane.id}"] [data-event-id="${second.build.id}"]`).count()).toBe(0);
    await page.waitForSelector(`[data-testid="unscheduled-${second.build.code}"]`);
    const row = await db.selectFrom("builds").select(["state", "version"]).where("id", "=", second.build.id).executeTakeFirstOrThrow();
    expect(row).toEqual({ state: "draft", version: second.build.version });
    await page.close();
  });

  it("refuses a lane that is not a printer before the drop lands, and says why", async () => {
    const page = await context.newPage();
    await openNextWeek(page);
    const station = (await db.selectFrom("wash_stations").select("id").where("active", "=", true).orderBy("name").executeTakeFirstOrThrow()).id;
    const source = await page.locator(`[data-testid="unscheduled-${second.build.code}"]`).boundingBox();
    const target = await page.locator(`.fc-timeline-lane[data-resource-id="${station}"]`).first().boundingBox();
    const slot = await page.locator(".fc-timeline-slot-lane").nth(12).boundingBox();
    await page.mouse.move(source!.x + 10, source!.y + 10);
    await page.mouse.down();
    await page.mouse.move(slot!.x + 4, target!.y + target!.height / 2, { steps: 25 });
    await expect.poll(async () => page.getByTestId("drag-hint").textContent()).toContain("builds go on printers");
    await screenshot(page, "floor-refused-lane");
    await page.mouse.up();
    await page.waitForTimeout(500);
    const row = await db.selectFrom("builds").select("state").where("id", "=", second.build.id).executeTakeFirstOrThrow();
    expect(row.state).toBe("draft");
    await page.close();
  });

  it("draws a finished build as a block in its lane and opens the build when it is clicked", async () => {
    const material = await db.selectFrom("materials").select("id").where("code", "=", "17-4PH").executeTakeFirstOrThrow();
    const ends = new Date(Date.now() - 3_600_000);
    const starts = new Date(ends.getTime() - 2 * 3_600_000);
    const done = await db
      .insertInto("builds")
      .values({ code: `HX-${Date.now().toString(36)}`, material_id: material.id, printer_id: lane.id, state: "complete", starts_at: starts, ends_at: ends, est_minutes: 120, material_lot: "TEST" })
      .returning(["id", "code"])
      .executeTakeFirstOrThrow();
    const page = await context.newPage();
    await page.goto(`${appUrl()}/floor`);
    await page.waitForSelector('[data-testid="floor-board"][data-ready="true"]');
    // Early on a Sunday the build finished in last week's view.
    if (ends.getTime() <= Date.parse(openingWeek(shopZone).from)) {
      await page.click(".fc-prev-button");
      await page.waitForFunction(() => document.querySelector('[data-testid="floor-board"]')?.getAttribute("data-ready") === "true");
    }
    const block = page.locator(`.fc-timeline-lane[data-resource-id="${lane.id}"] .fc-bg-event.hearth-history [data-event-id="${done.id}"]`);
    await block.waitFor({ timeout: 15_000 });
    expect(await block.textContent()).toContain(done.code);
    expect(await block.getAttribute("data-detail")).toBe("done");
    await screenshot(page, "floor-finished-block");
    const box = (await block.boundingBox())!;
    await page.mouse.click(box.x + 3, box.y + box.height / 2);
    await page.waitForURL(`**/builds/${done.id}`, { timeout: 15_000 });
    await page.close();
  });
});

/** The elements under a locator whose box is under 44 × 44 CSS px (WCAG 2.5.5, Target Size), with their size. */
async function smallTargets(targets: ReturnType<Page["locator"]>): Promise<string[]> {
  const small: string[] = [];
  for (let i = 0; i < (await targets.count()); i++) {
    const box = await targets.nth(i).boundingBox();
    if (box && (box.height < 44 || box.width < 44)) small.push(`${(await targets.nth(i).innerText()).trim()}: ${Math.round(box.width)} × ${Math.round(box.height)} px`);
  }
  return small;
}

describe("the floor on a 390 px touch screen", () => {
  it("the timeline's hour labels and the unscheduled builds' code links are 44 px touch targets", async () => {
    const draft = await makeDraftBuild(tech, db, { material: "17-4PH", due: new Date(Date.now() + 5 * 86_400_000) });
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const [name, value] = tech.split("=");
    await ctx.addCookies([{ name, value, url: appUrl() }]);
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    try {
      await page.goto(`${appUrl()}/floor`);
      await page.waitForSelector('[data-testid="floor-board"][data-ready="true"]');
      // The label and the header cell around it (which clips it): a label wider than its slot would overlap the next.
      const hours = page.locator(".fc-timeline-header .fc-timeline-slot-cushion");
      expect(await hours.count()).toBeGreaterThanOrEqual(24);
      expect(await smallTargets(hours)).toEqual([]);
      expect(await smallTargets(page.locator(".fc-timeline-header th.fc-timeline-slot-label"))).toEqual([]);
      const code = page.getByTestId(`unscheduled-${draft.build.code}`).getByRole("link", { name: draft.build.code });
      await code.waitFor();
      expect(await smallTargets(page.getByTestId("unscheduled-list").getByRole("link"))).toEqual([]);
      expect(await page.evaluate(() => document.scrollingElement!.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
      await screenshot(page, "phone-technician-floor-targets");
    } finally {
      await ctx.close();
    }
  });

  it("a technician's day by touch: sign in, book a build onto a printer, open it, start it and complete it", async () => {
    const printer = await makePrinter(db, { materials: ["17-4PH"], build: [300, 250, 200], rate: 20, name: `AB-${Date.now().toString(36)}` });
    try {
      const draft = await makeDraftBuild(tech, db, { material: "17-4PH", due: new Date(Date.now() + 3 * 86_400_000) });
      const ctx = await browser.newContext({ ...WIDTHS.phone });
      const page = await ctx.newPage();
      page.setDefaultTimeout(60_000);
      try {
        await page.goto(`${appUrl()}/sign-in`);
        await page.getByLabel("E-mail").tap();
        await page.getByLabel("E-mail").fill(DEMO.technician);
        await page.getByLabel("Password").fill("hearth-demo");
        await page.getByRole("button", { name: "Sign in" }).tap();
        await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"));
        await page.goto(`${appUrl()}/floor`);
        await page.waitForSelector('[data-testid="floor-board"][data-ready="true"]');
        await page.getByTestId(`unscheduled-${draft.build.code}`).waitFor();
        await screenshot(page, "phone-technician-day-1-floor");

        // Booking without a drag: the form's build, printer and start (the next whole hour by default).
        const form = page.locator('form[aria-labelledby="book-heading"]');
        await form.scrollIntoViewIfNeeded();
        await form.getByLabel("Build").selectOption(draft.build.id);
        await form.getByLabel("Printer").selectOption(printer.id);
        const book = form.getByRole("button", { name: "Book" });
        expect((await book.boundingBox())!.height).toBeGreaterThanOrEqual(44);
        await book.tap();
        await expect.poll(async () => (await db.selectFrom("builds").select("state").where("id", "=", draft.build.id).executeTakeFirstOrThrow()).state, { timeout: 20_000 }).toBe("scheduled");
        await page.getByTestId("floor-message").waitFor();
        await screenshot(page, "phone-technician-day-2-booked");

        // The build page: start, then complete; each button a finger-sized target.
        await page.goto(`${appUrl()}/builds/${draft.build.id}`);
        // Every link on the build page (the PDFs, the units and their parts) is finger-sized.
        await page.getByTestId("traveler-link").waitFor();
        expect(await smallTargets(page.getByTestId("build-view").locator("a"))).toEqual([]);
        // The next-step card leads the build page on a phone: its one button starts the build.
        const start = page.getByTestId("next-step");
        await start.waitFor();
        expect(await start.textContent()).toBe("Start build");
        expect((await start.boundingBox())!.height).toBeGreaterThanOrEqual(44);
        await start.tap();
        await expect.poll(async () => page.getByTestId("build-state").textContent(), { timeout: 20_000 }).toBe("printing");
        // Then the same card's button completes it.
        const complete = page.getByTestId("next-step");
        await expect.poll(async () => complete.textContent(), { timeout: 20_000 }).toBe("Complete build");
        await screenshot(page, "phone-technician-day-3-running");
        await complete.tap();
        await expect.poll(async () => (await db.selectFrom("builds").select("state").where("id", "=", draft.build.id).executeTakeFirstOrThrow()).state, { timeout: 20_000 }).toBe("complete");
        const units = await db.selectFrom("units").select("state").where("build_id", "=", draft.build.id).execute();
        expect(units.length).toBeGreaterThan(0);
        expect(units.every((u) => u.state === "green")).toBe(true);
        await page.getByTestId("next-step-message").waitFor();
        expect(await page.evaluate(() => document.scrollingElement!.scrollWidth - window.innerWidth)).toBeLessThanOrEqual(0);
        await screenshot(page, "phone-technician-day-4-complete");
      } finally {
        await ctx.close();
      }
    } finally {
      await retirePrinters(db, [printer.id]);
    }
  }, 180_000);
});

describe("the floor in a browser on another zone's clock", () => {
  const BROWSER_ZONE = "Asia/Tokyo";
  let far: BrowserContext;
  let zoneLane: { id: string; name: string };
  let shown: Awaited<ReturnType<typeof makeDraftBuild>>;
  let dropped: Awaited<ReturnType<typeof makeDraftBuild>>;
  /** Next week's day (0 = Sunday) in the shop's zone, the week the tests open. */
  const nextWeekDay = (weekday: number): LocalDate => addLocalDays(localDateOf(Date.parse(openingWeek(shopZone).to), shopZone), weekday);
  const slotLane = (page: Page, day: LocalDate, hour: number) => {
    const two = (n: number) => String(n).padStart(2, "0");
    return page.locator(`.fc-timeline-slot-lane[data-date="${day.year}-${two(day.month)}-${two(day.day)}T${two(hour)}:00:00"]`);
  };

  beforeAll(async () => {
    // The demo shop keeps its own zone; the point is that the browser's differs from it.
    expect(shopZone).not.toBe(BROWSER_ZONE);
    zoneLane = await makePrinter(db, { materials: ["17-4PH"], build: [300, 250, 200], rate: 20, name: `AB-${Date.now().toString(36)}` });
    shown = await makeDraftBuild(tech, db, { material: "17-4PH" });
    dropped = await makeDraftBuild(tech, db, { material: "17-4PH", due: new Date(Date.now() - 86_400_000) });
    far = await browser.newContext({ viewport: { width: 1600, height: 1100 }, timezoneId: BROWSER_ZONE });
    const [name, value] = tech.split("=");
    await far.addCookies([{ name, value, url: appUrl() }]);
  });

  afterAll(async () => {
    await far?.close();
    await retirePrinters(db, [zoneLane.id]);
  });

  it("runs the browser on another clock", async () => {
    const page = await far.newPage();
    expect(await page.evaluate(() => Intl.DateTimeFormat().resolvedOptions().timeZone)).toBe(BROWSER_ZONE);
    await page.close();
  });

  it("shows a booking at its hour in the shop's zone", async () => {
    // Wednesday 09:00 in the shop is Wednesday 23:00 in Tokyo (22:00 in summer time)
    const day = nextWeekDay(3);
    const startsAt = new Date(zonedTimeToUtc(day, 9 * 60, shopZone));
    const res = await api(`/api/builds/${shown.build.id}/schedule`, { method: "PATCH", cookie: tech, body: { version: shown.build.version, printer_id: zoneLane.id, starts_at: startsAt.toISOString() } });
    expect(res.status, JSON.stringify(res.body)).toBe(200);

    const page = await far.newPage();
    await openNextWeek(page, zoneLane.id);
    expect(await page.locator("body").textContent()).toContain(`Times are the shop's, in ${shopZone.replaceAll("_", " ")}`);
    const booking = page.locator(`.fc-timeline-lane[data-resource-id="${zoneLane.id}"] [data-event-id="${shown.build.id}"]`);
    await booking.waitFor({ timeout: 15_000 });
    const left = await booking.evaluate((el) => el.closest(".fc-timeline-event-harness")!.getBoundingClientRect().left);
    // The week view's slots are six hours: 09:00 is half-way through the 06:00 slot.
    const slot = (await slotLane(page, day, 6).boundingBox())!;
    expect(Math.abs(left - (slot.x + slot.width / 2))).toBeLessThan(3);
    await screenshot(page, "floor-shop-zone-booking");
    await page.close();
  });

  it("draws the now line at the shop's time", async () => {
    const page = await far.newPage();
    await page.goto(`${appUrl()}/floor`);
    await page.waitForSelector('[data-testid="floor-board"][data-ready="true"]');
    const line = page.locator(".fc-timeline-now-indicator-line").first();
    await line.waitFor({ timeout: 15_000 });
    const now = zonedParts(Date.now(), shopZone);
    const slot = (await slotLane(page, now, now.hour - (now.hour % 6)).boundingBox())!;
    const fraction = ((now.hour % 6) * 60 + now.minute + now.second / 60) / 360;
    const x = (await line.boundingBox())!.x;
    // a minute is about a tenth of a pixel here; allow for the seconds the page took
    expect(Math.abs(x - (slot.x + fraction * slot.width))).toBeLessThan(3);
    await page.close();
  });

  it("books the instant of the shop-zone slot a build is dropped on", async () => {
    const page = await far.newPage();
    await openNextWeek(page, zoneLane.id);
    await page.waitForSelector(`[data-testid="unscheduled-${dropped.build.code}"]`);
    // Thursday 12:00 shop time in the day view, whose hour slots are wide enough to aim at
    // the middle of one 15-minute snap.
    const day = nextWeekDay(4);
    await page.click(".fc-resourceTimelineDay-button");
    await page.waitForFunction(() => document.querySelector('[data-testid="floor-board"]')?.getAttribute("data-ready") === "true");
    for (let i = 0; i < 8 && (await slotLane(page, day, 12).count()) === 0; i++) {
      const shownDay = (await page.locator(".fc-timeline-slot-lane[data-date]").first().getAttribute("data-date"))!.slice(0, 10);
      const target = `${day.year}-${String(day.month).padStart(2, "0")}-${String(day.day).padStart(2, "0")}`;
      await page.click(shownDay < target ? ".fc-next-button" : ".fc-prev-button");
      await page.waitForFunction(() => document.querySelector('[data-testid="floor-board"]')?.getAttribute("data-ready") === "true");
    }
    const slot = (await slotLane(page, day, 12).boundingBox())!;
    const snapPx = slot.width / 4;
    expect(snapPx).toBeGreaterThan(6);
    const source = (await page.locator(`[data-testid="unscheduled-${dropped.build.code}"]`).boundingBox())!;
    const laneBox = (await page.locator(`.fc-timeline-lane[data-resource-id="${zoneLane.id}"]`).first().boundingBox())!;
    await page.mouse.move(source.x + source.width / 2, source.y + source.height / 2);
    await page.mouse.down();
    await page.mouse.move(source.x + source.width / 2 - 20, source.y + source.height / 2, { steps: 5 });
    await page.mouse.move(slot.x + snapPx / 2, laneBox.y + laneBox.height / 2, { steps: 25 });
    await page.waitForTimeout(200);
    await page.mouse.up();
    const message = page.getByTestId("floor-message");
    await expect.poll(async () => message.getAttribute("data-tone"), { timeout: 15_000 }).toBe("success");
    const expected = new Date(zonedTimeToUtc(day, 12 * 60, shopZone));
    const row = await db.selectFrom("builds").select(["printer_id", "starts_at"]).where("id", "=", dropped.build.id).executeTakeFirstOrThrow();
    expect(row.printer_id).toBe(zoneLane.id);
    expect(row.starts_at?.toISOString()).toBe(expected.toISOString());
    // the message reads the shop's clock too
    expect(await message.textContent()).toContain("12:00");
    await screenshot(page, "floor-shop-zone-drop");
    await page.close();
  });
});
