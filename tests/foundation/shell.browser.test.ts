import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";

describe("the app shell in a browser", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it("answers its health check", async () => {
    const res = await fetch(`${appUrl()}/api/health`);
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(200);
    expect(body.checks.database.ok).toBe(true);
    expect(body.checks.migrations.pending).toBe(0);
    expect(body.checks.worker.ok).toBe(true);
    expect(body.checks.smtp.ok).toBe(true);
    expect(body.checks.storage.ok).toBe(true);
  });

  it("shows the product name and navigation", async () => {
    const page = await browser.newPage();
    await page.goto(`${appUrl()}/`);
    await expect(page.getByText("Hearth", { exact: true }).first().isVisible()).resolves.toBe(true);
    const nav = page.getByRole("navigation", { name: "Main" });
    expect(await nav.isVisible()).toBe(true);
    await screenshot(page, "shell");
    await page.close();
  });
});
