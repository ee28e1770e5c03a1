import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { DEMO, signIn } from "../helpers/session";

describe("the app shell in a browser", () => {
  let browser: Browser;
  beforeAll(async () => {
    browser = await launchBrowser();
  });
  afterAll(async () => {
    await browser?.close();
  });

  it("answers its health check: only up or down to the public, every check to an admin", async () => {
    const open = await fetch(`${appUrl()}/api/health`);
    expect(open.status).toBe(200);
    expect(await open.json()).toEqual({ status: "up" });
    const res = await fetch(`${appUrl()}/api/health`, { headers: { cookie: await signIn(DEMO.admin) } });
    const body = await res.json();
    expect(res.status, JSON.stringify(body)).toBe(200);
    expect(body.status).toBe("up");
    expect(body.checks.database.ok).toBe(true);
    expect(body.checks.migrations.pending).toBe(0);
    expect(body.checks.worker.ok).toBe(true);
    expect(body.checks.smtp.ok).toBe(true);
    expect(body.checks.storage.ok).toBe(true);
  });

  it("sends a signed-out visitor to sign in, then shows the product name and navigation", async () => {
    const page = await browser.newPage();
    await page.goto(`${appUrl()}/parts`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await page.getByLabel("E-mail").fill("technician@demo.hearth.test");
    await page.getByLabel("Password").fill("hearth-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/parts$/);
    expect(await page.getByTestId("user-name").textContent()).toBe("Priya Raman");
    await expect(page.getByText("Hearth", { exact: true }).first().isVisible()).resolves.toBe(true);
    const nav = page.getByRole("navigation", { name: "Main" });
    expect(await nav.isVisible()).toBe(true);
    await screenshot(page, "shell");
    await page.close();
  });
});
