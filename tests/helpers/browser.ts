import { mkdirSync } from "node:fs";
import path from "node:path";
import { chromium, type Browser, type Page } from "playwright-core";

export const appUrl = () => process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3100}`;

/** Playwright gives every launch a fresh temporary profile of its own. */
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.HEARTH_CHROMIUM ?? "/usr/bin/chromium",
    headless: true,
    args: [
      "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
      "--disable-component-update", "--disable-sync",
    ],
  });
}

/** Saves a full-page screenshot under test-results/screenshots and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = path.join(process.env.HEARTH_TEST_OUTPUT ?? "test-results", "screenshots");
  mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
