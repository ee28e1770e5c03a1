// The running app (the test stack's app, worker and mail capture server on the seeded demo
// shop): the status in /api/health, GET /api/jobs and GET /api/mail, and the two admin pages.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser } from "playwright-core";
import { sql } from "kysely";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";
import { testDb } from "../helpers/db";
import { DEMO, api, signIn } from "../helpers/session";
import { DEMO_PASSWORD } from "@/db/seed-users";

const { db, close } = testDb();
let browser: Browser;
let admin: string;

beforeAll(async () => {
  admin = await signIn(DEMO.admin);
  browser = await launchBrowser();
  // The stack's worker sweeps at start: the seeded shop has runs whose units wait to move on.
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    const r = await sql<{ n: number }>`select count(*)::int as n from worker_sweeps where finished_at is not null`.execute(db);
    if (r.rows[0].n > 0) break;
    await new Promise((res) => setTimeout(res, 500));
  }
});

afterAll(async () => {
  await browser?.close();
  await close();
});

describe("status and read APIs", () => {
  it("health reports queue depths, the oldest waiting job and the last sweep", async () => {
    const res = await api("/api/health", { cookie: admin });
    expect(res.status).toBe(200);
    const jobs = res.body.checks.jobs;
    expect(jobs.ok).toBe(true);
    expect(Object.keys(jobs.queues)).toEqual(expect.arrayContaining(["advance-booking", "send-mail", "recompute-scale-up"]));
    expect(jobs.queues["advance-booking"]).toEqual({ waiting: expect.any(Number), scheduled: expect.any(Number), active: expect.any(Number), failed: expect.any(Number) });
    expect(jobs).toHaveProperty("oldest_waiting_s");
    expect(jobs.last_sweep).toMatchObject({ age_s: expect.any(Number), worker_id: expect.any(String) });
    expect(jobs.last_sweep.age_s).toBeLessThan(300);
    expect(jobs.outbox).toHaveProperty("pending");
  });

  it("GET /api/jobs lists queues, failed jobs and sweeps for an admin, and refuses others", async () => {
    const ok = await api("/api/jobs", { cookie: admin });
    expect(ok.status).toBe(200);
    expect(ok.body.installed).toBe(true);
    expect(ok.body.queues.map((q: { queue: string }) => q.queue)).toContain("advance-booking");
    expect(Array.isArray(ok.body.failed)).toBe(true);
    expect(ok.body.sweeps.length).toBeGreaterThan(0);

    // A failed job, recorded the way pg-boss records one, shows with its error.
    const id = crypto.randomUUID();
    await sql`insert into pgboss.job (id, name, data, state, retry_limit, retry_count, output, completed_on)
      values (${id}, 'send-mail', ${JSON.stringify({ outbox_id: crypto.randomUUID() })}::jsonb, 'failed', 3, 3, ${JSON.stringify({ message: "test: relay refused" })}::jsonb, now())`.execute(db);
    try {
      const one = await api("/api/jobs?queue=send-mail", { cookie: admin });
      expect(one.body.failed.find((j: { id: string }) => j.id === id)).toMatchObject({ queue: "send-mail", error: "test: relay refused", retry_count: 3 });
      const other = await api("/api/jobs?queue=advance-booking", { cookie: admin });
      expect(other.body.failed.find((j: { id: string }) => j.id === id)).toBeUndefined();
    } finally {
      await sql`delete from pgboss.job where name = 'send-mail' and id = ${id}`.execute(db);
    }

    expect((await api("/api/jobs?limit=abc", { cookie: admin })).status).toBe(422);
    expect((await api("/api/jobs?queue=DROP%20TABLE", { cookie: admin })).status).toBe(422);
    expect((await api("/api/jobs", { cookie: await signIn(DEMO.technician) })).status).toBe(403);
    expect((await api("/api/jobs")).status).toBe(401);
  });

  it("GET /api/mail returns the captured messages and the outbox for an admin only", async () => {
    const ok = await api("/api/mail", { cookie: admin });
    expect(ok.status).toBe(200);
    expect(ok.body.capture_error).toBeNull();
    expect(Array.isArray(ok.body.messages)).toBe(true);
    expect(ok.body.outbox).toMatchObject({ pending: expect.any(Number), sent: expect.any(Number), failed: expect.any(Number) });
    expect((await api("/api/mail?to=not-an-address", { cookie: admin })).status).toBe(422);
    expect((await api("/api/mail", { cookie: await signIn(DEMO.manager) })).status).toBe(403);
    expect((await api("/api/mail")).status).toBe(401);
  });
});

describe("admin pages", () => {
  async function signedInPage() {
    const context = await browser.newContext({ viewport: { width: 1400, height: 1000 } });
    const page = await context.newPage();
    await page.goto(`${appUrl()}/sign-in`);
    await page.getByLabel("E-mail").fill(DEMO.admin);
    await page.getByLabel("Password").fill(DEMO_PASSWORD);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 30_000 });
    return { context, page };
  }

  it("/mail shows the messages the worker sent, in HTML and plain text", async () => {
    // The seeded shop's finished furnace run moves its units on at the first sweep and mails the machinist.
    const deadline = Date.now() + 60_000;
    let messages: { subject: string }[] = [];
    while (Date.now() < deadline) {
      messages = (await api("/api/mail", { cookie: admin })).body.messages;
      if (messages.some((m) => m.subject.startsWith("Ready for finishing"))) break;
      await new Promise((r) => setTimeout(r, 1000));
    }
    expect(messages.some((m) => m.subject.startsWith("Ready for finishing"))).toBe(true);

    const { context, page } = await signedInPage();
    try {
      await page.goto(`${appUrl()}/mail`);
      const list = page.getByTestId("mail-list");
      await list.getByRole("button").first().waitFor();
      await list.getByRole("button", { name: /Ready for finishing/ }).first().click();
      const message = page.getByTestId("mail-message");
      await expect.poll(() => message.locator("h2").textContent()).toMatch(/^Ready for finishing/);
      await expect.poll(() => message.locator("iframe").count()).toBe(1);
      await screenshot(page, "worker-mail-html");
      await message.getByRole("button", { name: "Plain text" }).click();
      await expect.poll(() => message.locator("pre").textContent()).toMatch(/Stock/);
      await expect.poll(() => page.getByTestId("outbox-summary").textContent()).toMatch(/Sent\d+/);
      await screenshot(page, "worker-mail-text");
    } finally {
      await context.close();
    }
  });

  it("/setup/jobs shows the queues, the last sweep and failed jobs", async () => {
    const { context, page } = await signedInPage();
    try {
      await page.goto(`${appUrl()}/setup`);
      await page.getByRole("link", { name: /Background jobs/ }).click();
      await page.waitForURL(/\/setup\/jobs$/);
      await expect.poll(() => page.getByTestId("queue-table").textContent()).toContain("advance-booking");
      await expect.poll(() => page.getByTestId("last-sweep").textContent()).toMatch(/s ago|min ago/);
      await expect.poll(() => page.getByTestId("failed-jobs").textContent()).toMatch(/No failed jobs|send-mail|advance-booking/);
      await screenshot(page, "worker-setup-jobs");
    } finally {
      await context.close();
    }
  });

  it("/setup/jobs and /mail turn away a role without the permission", async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    try {
      await page.goto(`${appUrl()}/sign-in`);
      await page.getByLabel("E-mail").fill(DEMO.machinist);
      await page.getByLabel("Password").fill(DEMO_PASSWORD);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 30_000 });
      await page.goto(`${appUrl()}/setup/jobs`);
      expect(new URL(page.url()).pathname).toBe("/forbidden");
      await page.goto(`${appUrl()}/mail`);
      expect(new URL(page.url()).pathname).toBe("/forbidden");
    } finally {
      await context.close();
    }
  });
});
