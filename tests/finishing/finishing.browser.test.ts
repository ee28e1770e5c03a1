import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO } from "../helpers/session";
import { makeMaterial, PNG_1X1, readyUnit, tag } from "./fixtures";
import { WIDTHS } from "../helpers/viewports";

// A machinist receives a unit that is ready for finishing, records an inspection in inches,
// finishes the unit, and the material's calibration chart shows the new point.

const { db, close } = testDb();
let browser: Browser;

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await close();
});

async function signInAs(page: Page, email: string) {
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("hearth-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 60_000 });
}

describe("finishing in the browser", () => {
  it("on a phone every link and button on a unit card in finishing is a 44 px touch target (WCAG 2.5.5)", async () => {
    const material = await makeMaterial(db, `TCH-${tag()}`, { xy: 0.15, z: 0.17 });
    const { unit } = await readyUnit(db, { materialId: material.id, part: { nominal: [25, 40, 12], green: [30, 47.65, 14.76] } });
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const page = await ctx.newPage();
    try {
      await signInAs(page, DEMO.machinist);
      const card = page.locator(`[data-testid="finishing-card"][data-serial="${unit.serial}"]`);
      await card.waitFor({ timeout: 60_000 });
      await card.getByRole("button", { name: "Accept" }).tap();
      await page.getByText(`${unit.serial}: now finishing.`).waitFor();
      const inFinishing = page.locator('[data-testid="section-in-finishing"]').locator(`[data-serial="${unit.serial}"]`);
      await inFinishing.getByRole("link", { name: "Inspect" }).waitFor();
      const controls = inFinishing.locator("a, button");
      const small: string[] = [];
      for (let i = 0; i < (await controls.count()); i++) {
        const box = await controls.nth(i).boundingBox();
        if (box && box.height < 44) small.push(`${await controls.nth(i).innerText()}: ${Math.round(box.height)} px`);
      }
      await screenshot(page, "phone-machinist-finishing-card");
      expect(small).toEqual([]);
    } finally {
      await ctx.close();
    }
  }, 120_000);

  it("on a phone, from a traveler's address while signed out: sign in, land on the unit, accept, inspect with a camera photo, finish — the next step never offers a refused finish", async () => {
    const material = await makeMaterial(db, `TRV-${tag()}`, { xy: 0.15, z: 0.17 });
    const { unit } = await readyUnit(db, { materialId: material.id, part: { nominal: [25, 40, 12], green: [30, 47.65, 14.76] } });
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const page = await ctx.newPage();
    page.setDefaultTimeout(60_000);
    try {
      // The unit's QR code holds APP_URL + /units/<id>.
      await page.goto(`${appUrl()}/units/${unit.id}`);
      expect(new URL(page.url()).pathname).toBe("/sign-in");
      await page.getByLabel("E-mail").fill(DEMO.machinist);
      await page.getByLabel("Password").fill("hearth-demo");
      await page.getByRole("button", { name: "Sign in" }).tap();
      await page.waitForURL((u) => u.pathname === `/units/${unit.id}`);
      const next = page.getByTestId("next-step");
      await page.getByTestId("next-step-card").getByText(unit.serial).first().waitFor();
      expect(await next.textContent()).toBe("Accept into finishing");
      await next.tap();
      await page.getByText(`${unit.serial} accepted: it is in finishing.`).waitFor();
      // No inspection yet: the step is the inspection, not a finish the server would refuse.
      await page.waitForFunction(() => document.querySelector('[data-testid="next-step"]')?.textContent === "Record an inspection with a photo");
      await screenshot(page, "phone-machinist-unit-accepted");
      await next.tap();
      await page.waitForURL((u) => u.pathname === `/finishing/${unit.id}`);
      await page.getByTestId("inspection-form").waitFor();
      await page.getByLabel("As sintered X").fill("1.0050");
      await page.getByLabel("As sintered Y").fill("1.6000");
      await page.getByLabel("As sintered Z").fill("0.4820");
      await page.getByLabel("Finished X").fill("0.9843");
      await page.getByLabel("Pass").check();
      await page.getByRole("button", { name: "Save inspection" }).tap();
      await page.getByTestId("unit-flash").getByText("Inspection saved").waitFor();
      // The rear camera's input: a photo taken on the phone goes through the streamed upload.
      const photo = Buffer.concat([PNG_1X1, Buffer.alloc(200 * 1024, 7)]);
      await page.getByTestId("inspection-camera").first().setInputFiles({ name: "bore.png", mimeType: "image/png", buffer: photo });
      await page.getByTestId("inspection-list").getByText(/Photo · bore\.png/).waitFor();
      await screenshot(page, "phone-machinist-inspection-photo");

      await page.goto(`${appUrl()}/units/${unit.id}`);
      await page.waitForFunction(() => document.querySelector('[data-testid="next-step"]')?.textContent === "Finish");
      await next.tap();
      await page.getByText(`${unit.serial} finished.`).waitFor();
      const row = await db.selectFrom("units").select("state").where("id", "=", unit.id).executeTakeFirstOrThrow();
      expect(row.state).toBe("done");
      const file = await db
        .selectFrom("inspection_files as f")
        .innerJoin("inspections as i", "i.id", "f.inspection_id")
        .innerJoin("files", "files.id", "f.file_id")
        .select(["files.size_bytes"])
        .where("i.unit_id", "=", unit.id)
        .executeTakeFirstOrThrow();
      expect(Number(file.size_bytes)).toBe(photo.byteLength);
    } finally {
      await ctx.close();
    }
  }, 180_000);

  it("accepts, inspects and finishes a unit; the calibration chart gains its point", async () => {
    const material = await makeMaterial(db, `BRW-${tag()}`, { xy: 0.15, z: 0.17 });
    // green 30.0 × 47.65 × 14.76 mm as printed; nominal 25 × 40 × 12 with 0.25 mm stock
    const { unit } = await readyUnit(db, { materialId: material.id, part: { nominal: [25, 40, 12], green: [30, 47.65, 14.76], tolerance_grade: "IT7" } });
    const serial = unit.serial;

    const page = await browser.newPage({ viewport: { width: 1400, height: 1000 } });
    await signInAs(page, DEMO.machinist);
    expect(new URL(page.url()).pathname).toBe("/finishing");
    const card = page.locator(`[data-testid="finishing-card"][data-serial="${serial}"]`);
    await card.waitFor();
    // the drawing's IT7 read as µm for each nominal size (ISO 286-1 table: 21, 25, 18 µm)
    expect(await card.textContent()).toContain("X 21 µm · Y 25 µm · Z 18 µm");
    await screenshot(page, "finishing-queue");

    await card.getByRole("button", { name: "Accept" }).click();
    await page.getByText(`${serial}: now finishing.`).waitFor();
    const inFinishing = page.locator('[data-testid="section-in-finishing"]').locator(`[data-serial="${serial}"]`);
    await inFinishing.getByRole("link", { name: "Inspect" }).click();
    await page.waitForURL(new RegExp(`/finishing/${unit.id}`));
    await page.getByTestId("inspection-form").waitFor();

    // The demo machinist works in inches: 1.0050 in is 25.527 mm as sintered on X.
    await page.getByLabel("As sintered X").fill("1.0050");
    await page.getByLabel("As sintered Y").fill("1.6000");
    await page.getByLabel("As sintered Z").fill("0.4820");
    await page.getByLabel("Finished X").fill("0.9843");
    await page.getByLabel("Ra in µin").fill("28");
    await page.getByLabel("Runout in in").fill("0.0200");
    await page.getByLabel("Runout measured across").selectOption("x");
    // 0.508 mm TIR against 0.2635 mm per side left: the page warns before anything is saved
    await page.getByTestId("stock-check").getByText("Stock warning").waitFor();
    await page.getByLabel("Pass").check();
    await screenshot(page, "finishing-inspection-form");
    await page.getByRole("button", { name: "Save inspection" }).click();
    await page.getByTestId("unit-flash").getByText("Inspection saved").waitFor();
    await page.getByTestId("inspection-list").getByText("passed").first().waitFor();

    await page.getByRole("button", { name: "Mark finished" }).click();
    await page.getByTestId("unit-flash").getByText("Now done.").waitFor();
    await screenshot(page, "finishing-unit-done");

    const row = await db.selectFrom("units").select(["state"]).where("id", "=", unit.id).executeTakeFirstOrThrow();
    expect(row.state).toBe("done");
    const insp = await db.selectFrom("inspections").selectAll().where("unit_id", "=", unit.id).executeTakeFirstOrThrow();
    expect(Number(insp.sintered_x_mm)).toBeCloseTo(25.527, 9);
    expect(Number(insp.green_x_mm)).toBe(30);

    await page.goto(`${appUrl()}/finishing/calibration?material=${material.id}`);
    const chart = page.getByTestId("calibration-chart");
    await chart.waitFor();
    // one inspection, three axes measured green and sintered: three points
    expect(await chart.getAttribute("data-points")).toBe("3");
    expect(await page.locator(".recharts-scatter-symbol").count()).toBe(3);
    expect(await page.getByTestId("calibration-recent").textContent()).toContain(serial);
    // realized X shrinkage 1 − 25.527/30 = 14.91 %
    expect(await page.getByTestId("calibration-recent").textContent()).toContain("14.91 %");
    await screenshot(page, "finishing-calibration-chart");
    await page.close();
  });
  it("on a phone the queue's serial and run links are 44 px touch targets (WCAG 2.5.5)", async () => {
    const ctx = await browser.newContext({ ...WIDTHS.phone });
    const page = await ctx.newPage();
    try {
      await signInAs(page, DEMO.machinist);
      await page.goto(`${appUrl()}/finishing`);
      // The units finished by the tests above are listed this week.
      const recent = page.getByTestId("section-recent").getByRole("link");
      await recent.first().waitFor({ timeout: 60_000 });
      const links = page.locator('[data-testid="section-recent"] a, [data-testid="section-arriving"] a');
      const small: string[] = [];
      for (let i = 0; i < (await links.count()); i++) {
        const box = await links.nth(i).boundingBox();
        if (box && (box.height < 44 || box.width < 44)) small.push(`${await links.nth(i).innerText()}: ${Math.round(box.width)} × ${Math.round(box.height)} px`);
      }
      await screenshot(page, "phone-machinist-finishing-queue");
      expect(small).toEqual([]);
      // A unit's own page: its traveler, build, run and trace links too. A unit printed in a build
      // (this file's own units are made without one, and then have no build or traveler link).
      const built = await db.selectFrom("units").select("id").where("build_id", "is not", null).where("furnace_run_id", "is not", null)
        .where("state", "in", ["ready_for_finishing", "finishing", "done"]).orderBy("serial").executeTakeFirstOrThrow();
      await page.goto(`${appUrl()}/finishing/${built.id}`);
      const trace = page.getByRole("link", { name: "Full trace" });
      await trace.waitFor();
      for (const name of ["Full trace", /^Build /, "Traveler (PDF)"]) {
        const box = (await page.getByRole("link", { name }).first().boundingBox())!;
        expect(Math.min(box.width, box.height), String(name)).toBeGreaterThanOrEqual(44);
      }
    } finally {
      await ctx.close();
    }
  }, 120_000);
});
