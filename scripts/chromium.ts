// Headless Chromium as the browser tests and the floor benchmark drive it (Debian's `chromium`
// package through playwright-core). Every launch gets a fresh temporary profile of its own.
import { chromium, type Browser } from "playwright-core";

/**
 * Switches that keep the browser's own background work off a small machine's cores while a page
 * is measured or tested: no network chatter, updates or sync, and no address-bar popup. Recent
 * Chromium builds (156 here) draw that popup as a web page of their own (chrome://omnibox-popup
 * .top-chrome) and start it with every browser window, headless ones included; on two cores its
 * ~0.5 s of script ran beside the page under test and slowed it by a third.
 */
export const CHROMIUM_ARGS = [
  "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking",
  "--disable-component-update", "--disable-sync",
  "--disable-features=WebUIOmniboxPopup,WebUIOmniboxFullPopup,WebUIOmniboxAimPopup",
];

export function launchChromium(): Promise<Browser> {
  return chromium.launch({ executablePath: process.env.HEARTH_CHROMIUM ?? "/usr/bin/chromium", headless: true, args: CHROMIUM_ARGS });
}
