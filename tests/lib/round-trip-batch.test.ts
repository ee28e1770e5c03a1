import { describe, expect, it } from "vitest";
import { RoundTripBatch } from "@/lib/live/round-trip-batch";

// The callers that arrive together share one round trip, and a caller is never answered by a
// round trip sent before it asked (what a request's sign-in check must see: everything committed
// before the request arrived).

function recorder() {
  const trips: { keys: string[]; sentAt: number; finish: (v: string) => void; fail: (e: unknown) => void }[] = [];
  let clock = 0;
  const batch = new RoundTripBatch<string, string>(
    (keys) =>
      new Promise<string>((resolve, reject) => {
        trips.push({ keys, sentAt: ++clock, finish: resolve, fail: reject });
      }),
    3,
  );
  return { trips, batch, tick: () => ++clock };
}

const turn = () => new Promise((r) => setImmediate(r));

describe("RoundTripBatch", () => {
  it("sends the callers of one turn together, each key once", async () => {
    const { trips, batch } = recorder();
    const a = batch.ask("a");
    const b = batch.ask("b");
    const a2 = batch.ask("a");
    expect(trips).toHaveLength(0);
    await turn();
    expect(trips.map((t) => t.keys)).toEqual([["a", "b"]]);
    trips[0].finish("first");
    expect(await Promise.all([a, b, a2])).toEqual(["first", "first", "first"]);
  });

  it("answers a caller that asks while a trip is out with the next trip, sent after it asked", async () => {
    const { trips, batch, tick } = recorder();
    const early = batch.ask("a");
    await turn();
    const askedAt = tick();
    const late = batch.ask("b");
    const later = batch.ask("c");
    await turn();
    // One trip at a time: the late callers wait for the first to come back.
    expect(trips).toHaveLength(1);
    trips[0].finish("first");
    expect(await early).toBe("first");
    await turn();
    expect(trips).toHaveLength(2);
    expect(trips[1].keys).toEqual(["b", "c"]);
    expect(trips[1].sentAt).toBeGreaterThan(askedAt);
    trips[1].finish("second");
    expect(await Promise.all([late, later])).toEqual(["second", "second"]);
  });

  it("fails only the callers of the trip that failed", async () => {
    const { trips, batch } = recorder();
    const a = batch.ask("a");
    await turn();
    const b = batch.ask("b");
    trips[0].fail(new Error("connection reset"));
    await expect(a).rejects.toThrow("connection reset");
    await turn();
    trips[1].finish("ok");
    expect(await b).toBe("ok");
  });

  it("splits a crowd into trips of at most maxKeys, sent in the order they filled", async () => {
    const { trips, batch } = recorder();
    const answers = ["a", "b", "c", "d", "e", "f", "g"].map((k) => batch.ask(k));
    await turn();
    expect(trips.map((t) => t.keys)).toEqual([["a", "b", "c"]]);
    trips[0].finish("1");
    await turn();
    expect(trips[1].keys).toEqual(["d", "e", "f"]);
    trips[1].finish("2");
    await turn();
    expect(trips[2].keys).toEqual(["g"]);
    trips[2].finish("3");
    expect(await Promise.all(answers)).toEqual(["1", "1", "1", "2", "2", "2", "3"]);
  });

  it("does not stop after a run that throws before returning a promise", async () => {
    let n = 0;
    const batch = new RoundTripBatch<string, number>(async (keys) => {
      n += 1;
      if (n === 1) throw new Error("pool closed");
      return keys.length;
    });
    await expect(batch.ask("a")).rejects.toThrow("pool closed");
    expect(await batch.ask("b")).toBe(1);
  });
});
