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

describe("WindowCache refreshing behind an aged value", () => {
  it("answers the aged value while one reload runs, then the reloaded one; a moved stamp or a clear always waits for the new load", async () => {
    let t = 0;
    let loads = 0;
    const cache = new WindowCache<string>(1000, 10, () => t, 1000);
    let release: () => void = () => {};
    const load = () => {
      const n = ++loads;
      return n === 2 ? new Promise<string>((r) => (release = () => r(`v${n}`))) : Promise.resolve(`v${n}`);
    };
    expect(await cache.get("w", "1", load)).toBe("v1");
    t = 1500; // aged: v1 answered, one reload (v2) started behind it
    expect(await cache.get("w", "1", load)).toBe("v1");
    expect(await cache.get("w", "1", load)).toBe("v1");
    expect(loads).toBe(2);
    release();
    await new Promise((r) => setTimeout(r, 0));
    expect(await cache.get("w", "1", load)).toBe("v2");
    expect(await cache.get("w", "2", load)).toBe("v3"); // the stamp moved: the new load
    t = 5000; // past both limits: waits for the new load
    expect(await cache.get("w", "2", load)).toBe("v4");
    cache.clear();
    expect(await cache.get("w", "2", load)).toBe("v5");
  });

  it("does not let a reload that finishes after a clear put its value back", async () => {
    let t = 0;
    const cache = new WindowCache<string>(1000, 10, () => t, 1000);
    await cache.get("w", "1", async () => "old");
    t = 1500;
    let release: () => void = () => {};
    expect(await cache.get("w", "1", () => new Promise<string>((r) => (release = () => r("aged reload"))))).toBe("old");
    cache.clear();
    expect(await cache.get("w", "1", async () => "after the change")).toBe("after the change");
    release();
    await new Promise((r) => setTimeout(r, 0));
    expect(await cache.get("w", "1", async () => "never")).toBe("after the change");
  });
});

describe("WindowCache warming after a change", () => {
  it("loads again, under the new stamp, the keys asked for lately, most recent first, once each", async () => {
    let t = 0;
    const loads: string[] = [];
    const cache = new WindowCache<string>(2000, 10, () => t);
    const loader = (key: string) => async () => {
      loads.push(key);
      return `${key}@${loads.length}`;
    };
    await cache.get("old", "1", loader("old"));
    t = 5_000;
    await cache.get("a", "1", loader("a"));
    t = 6_000;
    await cache.get("b", "1", loader("b"));
    await cache.get("c", "1", loader("c"));
    loads.length = 0;
    cache.clear();
    // "old" and "a" were last asked for too long before: not warmed; "b" and "c", most recent first.
    expect(cache.warm("2", 5, 500)).toBe(2);
    expect(loads).toEqual(["c", "b"]);
    // A page asking now shares the load already made; warming again starts nothing new.
    expect(await cache.get("c", "2", loader("c"))).toBe("c@1");
    expect(cache.warm("2", 5, 500)).toBe(0);
    expect(loads).toEqual(["c", "b"]);
    // At most `most` of them.
    expect(cache.warm("2b", 1, 500)).toBe(1);
    expect(loads).toEqual(["c", "b", "c"]);
    // A key only warmed, never asked for again, goes cold: warming is not a use.
    t = 10_000;
    expect(cache.warm("3", 5, 3_000)).toBe(0);
    t = 8_000;
    expect(cache.warm("3", 5, 2_500)).toBe(2);
    expect(loads).toEqual(["c", "b", "c", "c", "b"]);
  });

  it("keeps nothing a warm-up failed to load", async () => {
    const cache = new WindowCache<string>(2000, 10, () => 0);
    let fail = true;
    await cache.get("a", "1", async () => (fail ? Promise.reject(new Error("db down")) : "a")).catch(() => undefined);
    expect(cache.warm("2", 1, 1000)).toBe(1);
    await new Promise((r) => setImmediate(r));
    fail = false;
    expect(await cache.get("a", "2", async () => "a again")).toBe("a again");
  });
});
