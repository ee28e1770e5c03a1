import { describe, expect, it } from "vitest";
import { WindowCache } from "@/lib/floor/window-cache";

// The floor window cache: one load per window and stamp, reloaded when the stamp moves or the
// entry is too old, failures not kept.

describe("WindowCache", () => {
  it("serves a window from one load until the stamp moves or the entry ages out", async () => {
    let t = 0;
    let loads = 0;
    const cache = new WindowCache(2000, 10, () => t);
    const load = async () => `v${++loads}`;
    expect(await Promise.all([cache.get("w", "1", load), cache.get("w", "1", load)])).toEqual(["v1", "v1"]);
    t = 1500;
    expect(await cache.get("w", "1", load)).toBe("v1");
    expect(await cache.get("w", "2", load)).toBe("v2");
    t = 4000;
    expect(await cache.get("w", "2", load)).toBe("v3");
    cache.clear();
    expect(await cache.get("w", "2", load)).toBe("v4");
  });

  it("keeps windows apart, forgets failed loads and stays within its size", async () => {
    const cache = new WindowCache(2000, 2, () => 0);
    await expect(cache.get("a", "1", async () => Promise.reject(new Error("db down")))).rejects.toThrow("db down");
    expect(await cache.get("a", "1", async () => "a")).toBe("a");
    expect(await cache.get("b", "1", async () => "b")).toBe("b");
    await cache.get("c", "1", async () => "c");
    expect(cache.size).toBe(2);
  });
});
