import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { THROTTLE_MAX_FAILURES, THROTTLE_WINDOW_MS, describeWait, throttleMessage, throttleVerdict, waitForFailures } from "@/lib/auth/throttle";
import { hashToken, looksLikeToken, newToken, setPasswordUrl, TOKEN_TTL_MS } from "@/lib/auth/tokens";
import { showDemoSignIns } from "@/lib/auth/demo";
import { changePasswordSchema, createUserSchema, setPasswordSchema, updateProfileSchema, updateUserSchema } from "@/lib/auth/schemas";
import { accountMail } from "@/lib/auth/mail";

const MIN = 60_000;

describe("sign-in throttling rule", () => {
  const now = Date.UTC(2026, 11, 1, 12, 0, 0);

  it("lets four failures through and blocks at five, until the oldest counting one leaves the window", () => {
    const four = [1, 2, 3, 4].map((m) => now - m * MIN);
    expect(waitForFailures(four, now)).toBe(0);
    const five = [...four, now - 10 * MIN];
    // the oldest of the five (10 min ago) leaves the 15-minute window in 5 minutes
    expect(waitForFailures(five, now)).toBe(5 * MIN);
  });

  it("with more than five, waits for the failure that brings the count below five", () => {
    const seven = [1, 2, 3, 4, 5, 12, 14].map((m) => now - m * MIN);
    // oldest first: 14, 12, 5, 4, 3, 2, 1 → after 14 and 12 leave, five remain; after 5 leaves, four remain
    expect(waitForFailures(seven, now)).toBe(10 * MIN);
  });

  it("ignores failures outside the window", () => {
    const old = [16, 17, 18, 19, 20].map((m) => now - m * MIN);
    expect(waitForFailures(old, now)).toBe(0);
  });

  it("never states a wait longer than the window, and never zero while blocked (property)", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 0, max: THROTTLE_WINDOW_MS * 2 }), { maxLength: 30 }), (ago) => {
        const times = ago.map((a) => now - a);
        const wait = waitForFailures(times, now);
        const inWindow = times.filter((t) => t > now - THROTTLE_WINDOW_MS).length;
        if (inWindow < THROTTLE_MAX_FAILURES) return wait === 0;
        if (wait <= 0 || wait > THROTTLE_WINDOW_MS) return false;
        // after waiting, fewer than the limit remain in the window
        return times.filter((t) => t > now + wait - THROTTLE_WINDOW_MS && t <= now + wait).length < THROTTLE_MAX_FAILURES;
      }),
    );
  });

  it("blocks on either the account or the address and states the longer wait in the message", () => {
    const five = [1, 2, 3, 4, 5].map((m) => now - m * MIN);
    const verdict = throttleVerdict([], five, now);
    expect(verdict).toEqual({ blocked: true, retry_after_s: 600, scope: "address" });
    if (!verdict.blocked) throw new Error("unreachable");
    expect(throttleMessage(verdict)).toBe("Too many failed sign-ins from this address. Wait 10 minutes and try again.");
    expect(throttleVerdict(five, [], now)).toMatchObject({ blocked: true, scope: "account" });
    expect(throttleVerdict([], [], now)).toEqual({ blocked: false });
  });

  it("rounds a stated wait up", () => {
    expect(describeWait(1)).toBe("1 second");
    expect(describeWait(45)).toBe("45 seconds");
    expect(describeWait(61)).toBe("2 minutes");
    expect(describeWait(900)).toBe("15 minutes");
  });

});

describe("set-password tokens", () => {
  it("are 256-bit base64url strings stored only as their sha-256", () => {
    const a = newToken();
    const b = newToken();
    expect(a).not.toBe(b);
    expect(looksLikeToken(a)).toBe(true);
    expect(looksLikeToken(a + "x")).toBe(false);
    expect(looksLikeToken("../../etc")).toBe(false);
    expect(hashToken(a)).toMatch(/^[0-9a-f]{64}$/);
    expect(hashToken(a)).not.toContain(a);
    // sha-256("abc"), FIPS 180-2 appendix B.1
    expect(hashToken("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });

  it("last 48 hours for an invitation and 1 hour for a reset", () => {
    expect(TOKEN_TTL_MS.invite).toBe(48 * 3600_000);
    expect(TOKEN_TTL_MS.reset).toBe(3600_000);
  });

  it("travel in a link to /set-password on the app's address", () => {
    expect(setPasswordUrl("https://hearth.example/", "abc_-")).toBe("https://hearth.example/set-password?token=abc_-");
  });

  it("are mailed with the link and an escaped name", () => {
    const m = accountMail("invite", { name: "Ana <b>", shopName: "Test shop", link: "http://x/set-password?token=t", invitedBy: "Ines" });
    expect(m.text).toContain("http://x/set-password?token=t");
    expect(m.text).toContain("48 hours");
    expect(m.html).toContain("Ana &lt;b&gt;");
    expect(m.html).not.toContain("<b>");
    expect(accountMail("reset", { name: "A", shopName: "S", link: "L" }).text).toContain("1 hour");
  });
});

describe("account schemas", () => {
  it("refuse short passwords and mismatched confirmations with field errors", () => {
    const r = setPasswordSchema.safeParse({ token: "t", password: "short", confirm: "other" });
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join("."));
    expect(paths).toContain("password");
    const c = changePasswordSchema.safeParse({ current_password: "same-password-1", new_password: "same-password-1", confirm: "same-password-1" });
    expect(c.success).toBe(false);
    expect(c.error!.issues[0].path).toEqual(["new_password"]);
  });

  it("accept the five roles only, and need a version for an admin change", () => {
    expect(createUserSchema.safeParse({ email: "a@b.test", name: "A", role: "furnace_operator" }).success).toBe(true);
    expect(createUserSchema.safeParse({ email: "a@b.test", name: "A", role: "owner" }).success).toBe(false);
    expect(updateUserSchema.safeParse({ role: "admin" }).success).toBe(false);
    expect(updateUserSchema.safeParse({ version: 3 }).success).toBe(false);
    expect(updateUserSchema.safeParse({ version: 3, active: false }).success).toBe(true);
  });

  it("know the e-mail kinds a person may mute", () => {
    expect(updateProfileSchema.safeParse({ muted_mail: ["wash_done", "build_failed"] }).success).toBe(true);
    expect(updateProfileSchema.safeParse({ muted_mail: ["invite"] }).success).toBe(false);
    expect(updateProfileSchema.safeParse({ unit_pref: "cm" }).success).toBe(false);
  });
});

describe("demo sign-ins on the sign-in page", () => {
  it("are listed in development and in production unless HEARTH_DEMO=0", () => {
    expect(showDemoSignIns({ NODE_ENV: "development" })).toBe(true);
    expect(showDemoSignIns({ NODE_ENV: "development", HEARTH_DEMO: "0" })).toBe(true);
    expect(showDemoSignIns({ NODE_ENV: "production" })).toBe(true);
    expect(showDemoSignIns({ NODE_ENV: "production", HEARTH_DEMO: "0" })).toBe(false);
  });
});
