// Each demo role signs in through the form, sees its own navigation and signs out; an admin
// invites a new person, who chooses a password from the e-mailed link.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Browser, Page } from "playwright-core";
import { DEMO_PASSWORD, DEMO_USERS } from "@/db/seed-users";
import { HOME, ROLE_LABELS, navFor } from "@/lib/auth/permissions";
import { appUrl, launchBrowser, screenshot } from "../helpers/browser";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

async function signInWithForm(page: Page, email: string, password: string) {
  await page.goto(`${appUrl()}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
}

async function navLabels(page: Page) {
  return page.getByRole("navigation", { name: "Main" }).getByRole("link").allTextContents();
}

describe("each demo role in a browser", () => {
  for (const demo of DEMO_USERS) {
    it(`${ROLE_LABELS[demo.role]} signs in, sees its navigation, signs out`, async () => {
      const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
      const page = await context.newPage();
      await signInWithForm(page, demo.email, DEMO_PASSWORD);
      await page.waitForURL((url) => url.pathname === HOME[demo.role]);
      expect(await page.getByTestId("user-name").textContent()).toBe(demo.name);
      expect(await page.getByTestId("user-role").textContent()).toBe(ROLE_LABELS[demo.role]);
      expect(await navLabels(page)).toEqual(navFor(demo.role).map((n) => n.label));
      await screenshot(page, `auth-role-${demo.role}`);

      // a page the role may not open shows the 403 page, not the content
      if (demo.role !== "admin") {
        await page.goto(`${appUrl()}/setup/users`);
        expect(new URL(page.url()).pathname).toBe("/forbidden");
        await page.getByRole("heading", { name: "Not for your role" }).waitFor();
      }

      await page.goto(`${appUrl()}${HOME[demo.role]}`);
      await page.getByRole("button", { name: "Sign out" }).click();
      await page.waitForURL((url) => url.pathname === "/sign-in");
      await page.goto(`${appUrl()}/floor`);
      expect(new URL(page.url()).pathname + new URL(page.url()).search).toBe("/sign-in?next=%2Ffloor");
      await context.close();
    });
  }

  it("the sign-in page lists the demo sign-ins and a way to reset a password", async () => {
    const page = await browser.newPage();
    await page.goto(`${appUrl()}/sign-in`);
    const demo = page.getByTestId("demo-sign-ins");
    for (const u of DEMO_USERS) await demo.getByText(u.email).waitFor();
    await page.getByRole("link", { name: "Forgot your password?" }).waitFor();
    await page.getByLabel("E-mail").fill(DEMO_USERS[0].email);
    await page.getByLabel("Password").fill("definitely-wrong");
    await page.getByRole("button", { name: "Sign in" }).click();
    const alert = page.locator("form [role=alert]");
    await alert.waitFor();
    expect(await alert.textContent()).toBe("That e-mail address and password do not match an active account.");
    await screenshot(page, "auth-sign-in");
    await page.getByRole("link", { name: "Forgot your password?" }).click();
    await page.waitForURL(/\/forgot-password$/);
    await page.getByLabel("E-mail").fill(`nobody-${Date.now()}@test.hearth.test`);
    await page.getByRole("button", { name: "Send me a link" }).click();
    const answer = page.locator("form [role=status]");
    await answer.waitFor();
    expect(await answer.textContent()).toMatch(/^If that address belongs to an active account, a link to set a new password is on its way/);
    await screenshot(page, "auth-forgot-password");
    await page.close();
  });
});

describe("user administration in a browser", () => {
  it("an admin invites a person, who sets a password from the e-mail, signs in and changes settings; deactivation ends the session", async () => {
    const stamp = Date.now().toString(36);
    const email = `browser-${stamp}@test.hearth.test`;
    const name = `Noor Vasquez ${stamp}`;

    const admin = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const a = await admin.newPage();
    await signInWithForm(a, "admin@demo.hearth.test", DEMO_PASSWORD);
    await a.waitForURL((url) => url.pathname === "/setup");
    await a.getByRole("link", { name: /Users/ }).first().waitFor();
    await screenshot(a, "auth-setup-hub");

    await a.getByRole("link", { name: /^Users/ }).click();
    await a.waitForURL(/\/setup\/users$/);
    await a.getByTestId("user-row-admin@demo.hearth.test").waitFor();
    await a.getByRole("button", { name: "New user" }).click();
    const form = a.getByRole("form", { name: "New user" });
    await form.getByLabel("Name").fill(name);
    await form.getByLabel("E-mail").fill(email);
    await form.getByLabel("Role").selectOption("furnace_operator");
    await form.getByRole("button", { name: "Create and send invitation" }).click();
    await expect(a.getByTestId("users-flash").textContent()).resolves.toContain(`${name} has an account as Furnace operator. The e-mail has been sent.`);
    const row = a.getByTestId(`user-row-${email}`);
    await row.getByText("Invited", { exact: true }).waitFor();
    await screenshot(a, "auth-users-admin");

    // the invitation, as the capture server received it
    const res = await fetch(`${process.env.MAIL_CAPTURE_URL}/messages?to=${encodeURIComponent(email)}`);
    const { messages } = (await res.json()) as { messages: { text: string; subject: string }[] };
    expect(messages).toHaveLength(1);
    const link = /(http\S+\/set-password\?token=[A-Za-z0-9_-]{43})/.exec(messages[0].text)![1];

    const invitee = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    const p = await invitee.newPage();
    await p.goto(link);
    await p.getByRole("heading", { name: `Welcome, ${name}` }).waitFor();
    await p.getByLabel("New password").fill("short");
    await p.getByLabel("The same again").fill("short");
    await p.getByRole("button", { name: "Save password" }).click();
    await p.getByText("Use at least 10 characters").first().waitFor();
    await screenshot(p, "auth-set-password");
    await p.getByLabel("New password").fill("kiln-arch-ember-42");
    await p.getByLabel("The same again").fill("kiln-arch-ember-42");
    await p.getByRole("button", { name: "Save password" }).click();
    await p.waitForURL(/\/sign-in\?password=set/);
    expect(await p.getByLabel("E-mail").inputValue()).toBe(email);
    await p.getByLabel("Password").fill("kiln-arch-ember-42");
    await p.getByRole("button", { name: "Sign in" }).click();
    await p.waitForURL((url) => url.pathname === HOME.furnace_operator);

    // own settings, reached from the user slot
    await p.getByTestId("user-name").click();
    await p.waitForURL(/\/settings$/);
    const profile = p.getByRole("form", { name: "Name and units" });
    await profile.getByLabel("Name").fill(`${name} (nights)`);
    await profile.getByLabel("inches (in)").check();
    await profile.getByRole("button", { name: "Save" }).click();
    await expect(profile.getByRole("status").textContent()).resolves.toBe("Name and units saved.");
    await p.waitForFunction((n) => document.querySelector('[data-testid="user-name"]')?.textContent === n, `${name} (nights)`);
    const mail = p.getByRole("form", { name: "E-mail" });
    await mail.getByLabel("A wash batch is done").uncheck();
    await mail.getByRole("button", { name: "Save e-mail choices" }).click();
    await expect(mail.getByRole("status").textContent()).resolves.toBe("E-mail choices saved.");
    await screenshot(p, "auth-settings");

    // the admin deactivates the account; the person's next click lands on sign-in
    await a.reload();
    const row2 = a.getByTestId(`user-row-${email}`);
    await row2.getByRole("button", { name: "Deactivate" }).click();
    await row2.getByRole("button", { name: "Confirm: deactivate" }).click();
    await expect(a.getByTestId("users-flash").textContent()).resolves.toContain("is deactivated; their sessions have ended.");
    await a.getByTestId(`user-row-${email}`).getByText("Deactivated", { exact: true }).waitFor();
    await a.getByTestId(`user-row-${email}`).getByRole("button", { name: "History" }).click();
    await a.getByText("Invitation sent").first().waitFor();
    await screenshot(a, "auth-users-deactivated");

    await p.goto(`${appUrl()}/batches`);
    expect(new URL(p.url()).pathname).toBe("/sign-in");

    await invitee.close();
    await admin.close();
  });
});
