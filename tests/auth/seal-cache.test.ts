import { describe, expect, it } from "vitest";
import { sealData } from "iron-session";
import { unsealSession } from "@/lib/auth/seal-cache";
import { SESSION_IDLE_SECONDS } from "@/lib/auth/session-config";

// The unsealed-cookie cache: the same answer as iron-session's own unseal, only for the secret
// that sealed it, and nothing kept for seals that hold no user.

const SECRET = "seal-cache-test-secret-0123456789abcdef";
const OTHER = "another-secret-another-secret-another-secret";
const seal = (data: Record<string, unknown>, password = SECRET) => sealData(data, { password, ttl: SESSION_IDLE_SECONDS });

describe("unsealSession", () => {
  it("answers what the seal holds, and the same again from the cache", async () => {
    const data = { userId: "5f0c6f0e-6a4e-4f5b-9a59-0f3b5a1c2d3e", issuedAt: 1, seenAt: 2 };
    const s = await seal(data);
    expect(await unsealSession(s, SECRET)).toEqual(data);
    const again = await unsealSession(s, SECRET);
    expect(again).toEqual(data);
    // a copy each time: a caller changing its answer cannot change the next caller's
    again.userId = "changed";
    expect((await unsealSession(s, SECRET)).userId).toBe(data.userId);
  });

  it("never answers a seal from the cache for another secret", async () => {
    const s = await seal({ userId: "u-1", issuedAt: 1, seenAt: 1 });
    expect((await unsealSession(s, SECRET)).userId).toBe("u-1");
    expect(await unsealSession(s, OTHER)).toEqual({});
  });

  it("a seal made with another secret, a tampered or a garbage one holds nothing", async () => {
    const foreign = await seal({ userId: "u-2", issuedAt: 1, seenAt: 1 }, OTHER);
    expect(await unsealSession(foreign, SECRET)).toEqual({});
    const good = await seal({ userId: "u-3", issuedAt: 1, seenAt: 1 });
    const i = Math.floor(good.length / 2);
    const tampered = `${good.slice(0, i)}${good[i] === "A" ? "B" : "A"}${good.slice(i + 1)}`;
    expect(await unsealSession(tampered, SECRET)).toEqual({});
    await expect(unsealSession("garbage", SECRET)).resolves.toEqual({});
  });
});
