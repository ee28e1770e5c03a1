import { mkdirSync } from "node:fs";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { launchChromium } from "../../scripts/chromium";

export const appUrl = () => process.env.APP_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3100}`;

export const launchBrowser = (): Promise<Browser> => launchChromium();

/** Saves a full-page screenshot under test-results/screenshots and returns its path. */
export async function screenshot(page: Page, name: string): Promise<string> {
  const dir = path.join(process.env.HEARTH_TEST_OUTPUT ?? "test-results", "screenshots");
  mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
