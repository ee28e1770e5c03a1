import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import type { Browser, BrowserContext } from "playwright-core";
import { testDb } from "../helpers/db";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";
import { boxMesh, writeBinaryStl } from "@/lib/geometry/generate";
import { scaleUp } from "@/lib/process/scale-up";
import { makeOrder, makePart, uniq } from "../floor/fixtures";

// The order book in Chromium as a technician: upload an STL and read its volume and the
// scale-up; import a CSV with one bad row, see the row's error, import the valid rows only.

const { db, close } = testDb();
let browser: Browser;
let context: BrowserContext;
let tech: string;
const dir = mkdtempSync(path.join(tmpdir(), "hearth-parts-"));

beforeAll(async () => {
  tech = await signIn(DEMO.technician);
  browser = await launchBrowser();
  context = await browser.newContext({ viewport: { width: 1500, height: 1000 } });
  const [name, value] = tech.split("=");
  await context.addCookies([{ name, value, url: appUrl() }]);
});

afterAll(async () => {
  await browser?.close();
  await close();
});

describe("parts in a browser", () => {
  it("uploads an STL, follows the analysis to done and shows the volume, the closed verdict and the scale-up", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "316L", size: [40, 30, 20] });
    const file = path.join(dir, "bracket.stl");
    writeFileSync(file, writeBinaryStl(boxMesh(40, 30, 20)));

    const page = await context.newPage();
    await page.goto(`${appUrl()}/parts/${part.id}`);
    await page.getByTestId("scale-up-panel").waitFor();
    await page.getByTestId("stl-file").setInputFiles(file);
    await page.locator('[data-testid="analysis-status"][data-status="done"]').waitFor({ timeout: 30_000 });
    const volume = page.getByTestId("mesh-volume");
    await volume.waitFor({ timeout: 15_000 });
    expect(await volume.textContent()).toContain("24.00 cm³");
    expect(await page.getByTestId("closed-verdict").textContent()).toMatch(/^yes/);
    expect(await page.getByTestId("finished-volume").textContent()).toContain("24.00 cm³");

    const m = await db.selectFrom("materials").select(["shrink_xy", "shrink_z"]).where("code", "=", "316L").executeTakeFirstOrThrow();
    const s = scaleUp({ nominal: { x: 40, y: 30, z: 20 }, stock: { x_neg: 0.3, x_pos: 0.3, z_pos: 0.2 }, shrink: { xy: Number(m.shrink_xy), z: Number(m.shrink_z) } });
    expect(await page.getByTestId("green-x").textContent()).toBe(`${s.x.green.toFixed(2)} mm`);
    expect(await page.getByTestId("green-z").textContent()).toBe(`${s.z.green.toFixed(2)} mm`);
    await page.locator('[data-testid="mesh-preview"][data-status="ready"]').waitFor({ timeout: 15_000 }).catch(() => {});
    await screenshot(page, "part-geometry-scale-up");

    const row = await db.selectFrom("parts").select("volume_mm3").where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(Number(row.volume_mm3)).toBeCloseTo(24_000, 3);
    await page.close();
  });

  it("refuses a malformed STL with the parser's reason", async () => {
    const order = await makeOrder(tech);
    const part = await makePart(tech, db, { order_id: order.id, material: "316L" });
    const good = writeBinaryStl(boxMesh(10, 10, 10));
    const file = path.join(dir, "cut-short.stl");
    writeFileSync(file, good.subarray(0, good.length - 30));
    const page = await context.newPage();
    await page.goto(`${appUrl()}/parts/${part.id}`);
    await page.getByTestId("stl-file").setInputFiles(file);
    const err = page.getByTestId("upload-error");
    await err.waitFor({ timeout: 15_000 });
    expect(await err.textContent()).toMatch(/cannot be read as STL/);
    await screenshot(page, "part-geometry-refused");
    const files = await db.selectFrom("parts").select("geometry_file_id").where("id", "=", part.id).executeTakeFirstOrThrow();
    expect(files.geometry_file_id).toBeNull();
    await page.close();
  });

  it("imports a CSV with one bad row: the preview marks it, 'import all' is refused, the valid rows go in", async () => {
    const code = uniq("CSV");
    const csv = [
      "order_code,customer,due_date,priority,part_number,revision,name,material,quantity,nominal_x_mm,nominal_y_mm,nominal_z_mm,thickest_wall_mm,stock_x_neg_mm,stock_x_pos_mm",
      `${code},Csv Castings,2027-02-01,3,CV-1,A,valve seat,17-4PH,2,30,30,12,4,0.3,0.3`,
      `${code},Csv Castings,2027-02-01,3,CV-2,A,drive dog,UNOBTAINIUM,1,25,20,15,5,0,0`,
      `${code},Csv Castings,2027-02-01,3,CV-3,B,spacer ring,316L,3,40,40,8,3,0.2,0.2`,
    ].join("\n");
    const file = path.join(dir, "parts.csv");
    writeFileSync(file, csv);
    const page = await context.newPage();
    await page.goto(`${appUrl()}/parts`);
    await page.getByRole("button", { name: "Import CSV" }).click();
    await page.getByTestId("csv-file").setInputFiles(file);
    const summary = page.getByTestId("csv-summary");
    await summary.waitFor({ timeout: 15_000 });
    expect(await summary.textContent()).toContain("2 rows ready, 1 with errors");
    const bad = page.locator('[data-testid="csv-preview"] tr[data-line="3"]');
    expect(await bad.getAttribute("data-ok")).toBe("false");
    expect(await bad.textContent()).toContain('unknown material "UNOBTAINIUM"');
    expect(await page.getByRole("button", { name: /Import all 3 rows/ }).isDisabled()).toBe(true);
    await screenshot(page, "csv-import-preview");
    await page.getByRole("button", { name: "Import the 2 valid rows only" }).click();
    const notice = page.getByTestId("parts-notice");
    await notice.waitFor({ timeout: 15_000 });
    expect(await notice.textContent()).toContain("Imported 2 parts and 1 new order");
    const parts = await db
      .selectFrom("parts")
      .innerJoin("orders", "orders.id", "parts.order_id")
      .select(["parts.part_number", "parts.quantity"])
      .where("orders.code", "=", code)
      .orderBy("parts.part_number")
      .execute();
    expect(parts).toEqual([{ part_number: "CV-1", quantity: 2 }, { part_number: "CV-3", quantity: 3 }]);
    await screenshot(page, "csv-import-done");
    await page.close();
  });
});
