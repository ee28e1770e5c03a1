// npm run bench -- --only unit-page
// A traveler scanned on a phone: first render of a unit's page at 390 × 844 (touch, mobile) in
// headless Chromium, from navigation to the next-step card drawn with the unit's serial (the
// page's shell from the server, then the unit's history from /api/units/[id]/trace), signed in
// as the furnace operator, against the demo shop in a database of its own (hearth_bench_unit) and
// the built app (scripts/serve.ts) on loopback. Median of five cold contexts after one
// uncounted load. Target ≤ 1 s.
import os from "node:os";
import path from "node:path";
import fs from "node:fs";
import { createDb } from "@/db/client";
import { migrateToLatest } from "@/db/migrate";
import { seedDemoShop } from "@/db/seed";
import { startApp, stopProcs, waitFor, type Proc } from "../../scripts/stack";
import { launchChromium } from "../../scripts/chromium";
import { freshDatabase } from "../fresh-database";
import { ensureBuild } from "../setup";
import { median, r1 } from "../stats";
import type { BenchRow, BenchSection } from "../types";

const DB_NAME = process.env.HEARTH_BENCH_UNIT_DB ?? "hearth_bench_unit";
const PORT = Number(process.env.HEARTH_BENCH_UNIT_PORT ?? 3161);
const RUNS = 5;

export const section: BenchSection = {
  name: "unit-page",
  run: async () => {
    const rows: BenchRow[] = [];
    const { url, drop } = await freshDatabase(DB_NAME);
    const { db } = createDb(url, 2);
    let procs: Proc[] = [];
    try {
      await migrateToLatest(db);
      await seedDemoShop(db);
      const unit = await db.selectFrom("units").select(["id", "serial"]).where("state", "=", "brown").orderBy("serial").executeTakeFirstOrThrow();
      const base = `http://127.0.0.1:${PORT}`;
      const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: url, NEXT_DIST_DIR: ensureBuild(), NODE_ENV: "production", PORT: String(PORT), APP_URL: base, SESSION_SECRET: process.env.SESSION_SECRET ?? "bench-unit-secret-0123456789abcdef0123456789" };
      procs = [startApp(PORT, env, true)];
      await waitFor(`${base}/sign-in`, 90_000, (s) => s === 200);
      const res = await fetch(`${base}/api/session`, { method: "POST", headers: { "content-type": "application/json" }, body: JSON.stringify({ email: "furnace@demo.hearth.test", password: "hearth-demo" }) });
      const cookie = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="))?.split(";")[0];
      if (!cookie) throw new Error(`sign-in failed: ${res.status}`);
      const [name, value] = cookie.split("=");

      const browser = await launchChromium();
      const times: number[] = [];
      const shot = path.resolve("test-results/screenshots/bench-unit-page-phone.png");
      try {
        for (let run = 0; run <= RUNS; run++) {
          const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
          await context.addCookies([{ name, value, url: base }]);
          const page = await context.newPage();
          await page.goto(`${base}/units/${unit.id}`, { waitUntil: "commit" });
          await page.waitForFunction((serial) => document.querySelector('[data-testid="next-step-card"]')?.textContent?.includes(serial) ?? false, unit.serial, { timeout: 30_000, polling: "raf" });
          const ms = await page.evaluate(() => performance.now());
          if (run > 0) times.push(ms);
          if (run === 1) {
            fs.mkdirSync(path.dirname(shot), { recursive: true });
            await page.screenshot({ path: shot });
          }
          await context.close();
        }
      } finally {
        await browser.close();
      }
      const ms = median(times);
      rows.push({
        section: "unit-page",
        name: "unit page at 390 px (phone, touch): navigation to the next-step card drawn, median of 5 cold loads",
        metric: "ms",
        value: r1(ms),
        target: "≤ 1000",
        ok: ms <= 1000,
        detail: { runs_ms: times.map(r1), load_average_1m: r1(os.loadavg()[0]), cores: os.cpus().length, screenshot: shot },
      });
    } finally {
      await stopProcs(procs);
      await db.destroy();
      await drop();
    }
    return rows;
  },
};
