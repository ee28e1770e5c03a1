// The pure parts of live updates: what a notification may carry, how a burst is grouped, the
// event-stream framing (HTML Living Standard, "Server-sent events", event stream format) and
// the replay log behind Last-Event-ID; and which of a page's queries a change refetches.
import { describe, expect, it } from "vitest";
import { ChangeBatcher, ReplayLog, parseChange, sseFrame, touchesWaitingWash, type Change } from "@/lib/live/changes";
import { queryHears } from "@/components/live/query-map";

const A = "0b6f5f2e-8d7a-4c1e-9d2b-1f0e3a4b5c6d";
const B = "5a1c9e7d-3b2f-4e6a-8c0d-9e8f7a6b5c4d";

describe("parseChange", () => {
  it("takes the database's payloads and nothing else", () => {
    expect(parseChange(JSON.stringify({ e: "build", id: A, v: 3 }))).toEqual({ e: "build", id: A, v: 3 });
    expect(parseChange(JSON.stringify({ e: "inspection", id: A, unit: B }))).toEqual({ e: "inspection", id: A, unit: B });
    expect(parseChange(JSON.stringify({ e: "equipment" }))).toEqual({ e: "equipment" });
    expect(parseChange(JSON.stringify({ e: "user", id: A }))).toBeNull();
    expect(parseChange(JSON.stringify({ e: "build", id: "not-a-uuid" }))).toBeNull();
    expect(parseChange("{not json")).toBeNull();
    expect(parseChange(undefined)).toBeNull();
  });
});

describe("ChangeBatcher", () => {
  it("groups a burst into one flush, one entry per row at its highest version", async () => {
    const flushed: Change[][] = [];
    const b = new ChangeBatcher((c) => flushed.push(c), 20);
    b.push({ e: "unit", id: A, v: 2 });
    b.push({ e: "unit", id: A, v: 4 });
    b.push({ e: "unit", id: A, v: 3 });
    b.push({ e: "build", id: B, v: 1 });
    b.push({ e: "equipment" });
    b.push({ e: "equipment" });
    expect(flushed).toHaveLength(0);
    await new Promise((r) => setTimeout(r, 40));
    expect(flushed).toHaveLength(1);
    expect(flushed[0]).toEqual([{ e: "unit", id: A, v: 4 }, { e: "build", id: B, v: 1 }, { e: "equipment" }]);
    b.push({ e: "build", id: B, v: 2 });
    b.drain();
    expect(flushed[1]).toEqual([{ e: "build", id: B, v: 2 }]);
  });
});

describe("sseFrame", () => {
  it("writes fields one per line, data split on newlines, a blank line to end the event", () => {
    expect(sseFrame({ id: "p-1", event: "change", data: '{"a":1}' })).toBe('id: p-1\nevent: change\ndata: {"a":1}\n\n');
    expect(sseFrame({ data: "one\ntwo" })).toBe("data: one\ndata: two\n\n");
    expect(sseFrame({ retryMs: 2000, comment: "hi" })).toBe(": hi\nretry: 2000\n\n");
  });
});

describe("ReplayLog", () => {
  it("replays what came after an id of this process, and cannot answer for another process or a gap", () => {
    const log = new ReplayLog("abcd", 3);
    const ids = [1, 2, 3, 4].map((n) => log.append((id) => `frame ${n} ${id}\n\n`));
    expect(ids).toEqual(["abcd-1", "abcd-2", "abcd-3", "abcd-4"]);
    expect(log.since("abcd-2")).toEqual(["frame 3 abcd-3\n\n", "frame 4 abcd-4\n\n"]);
    expect(log.since("abcd-4")).toEqual([]);
    // Frame 1 has left the log (capacity 3), but all that followed it is still there.
    expect(log.since("abcd-1")).toEqual(["frame 2 abcd-2\n\n", "frame 3 abcd-3\n\n", "frame 4 abcd-4\n\n"]);
    // What followed abcd-0 includes frame 1, which is gone.
    expect(log.since("abcd-0")).toBeNull();
    expect(log.since("ffff-2")).toBeNull();
    expect(log.since("abcd-9")).toBeNull();
    expect(log.since("garbage")).toBeNull();
  });
});

describe("queryHears", () => {
  const build: Change = { e: "build", id: A, v: 2 };
  it("lists refetch on any change of what they list; the board does not care about a booked build", () => {
    expect(queryHears(["floor", "x", "y"], null, [build])).toBe(true);
    expect(queryHears(["unscheduled"], null, [build])).toBe(true);
    expect(queryHears(["batches-board"], null, [build])).toBe(false);
    expect(queryHears(["batches-board"], null, [{ e: "unit", id: B, v: 5 }])).toBe(true);
    expect(queryHears(["parts", 1], null, [build])).toBe(false);
  });
  it("a detail page refetches for its own row, or for a row its data names", () => {
    expect(queryHears(["furnace-run", A], null, [{ e: "furnace_run", id: A, v: 7 }])).toBe(true);
    expect(queryHears(["furnace-run", B], { run: { id: B } }, [{ e: "furnace_run", id: A, v: 7 }])).toBe(false);
    expect(queryHears(["trace", B], { build: { id: A } }, [build])).toBe(true);
    expect(queryHears(["trace", B], { build: { id: "other" } }, [build])).toBe(false);
    expect(queryHears(["trace", B], null, [{ e: "inspection", id: A, unit: B }])).toBe(true);
  });
  it("the floor's feedstock marks refetch on a build, unit, lot or material change, not on a wash batch", () => {
    expect(queryHears(["feedstock-shortfalls"], null, [{ e: "feedstock_lot", id: A, v: 3 }])).toBe(true);
    expect(queryHears(["feedstock-shortfalls"], null, [{ e: "material", id: A, v: 2 }])).toBe(true);
    expect(queryHears(["feedstock-shortfalls"], null, [build])).toBe(true);
    expect(queryHears(["feedstock-shortfalls"], null, [{ e: "wash_batch", id: A, v: 2 }])).toBe(false);
    expect(parseChange(JSON.stringify({ e: "feedstock_lot", id: A, v: 4 }))).toEqual({ e: "feedstock_lot", id: A, v: 4 });
  });
  it("a resync refetches every live query and nothing else", () => {
    expect(queryHears(["trace", B], null, null)).toBe(true);
    expect(queryHears(["users"], null, null)).toBe(false);
  });
});

describe("the draft list hears builds that are, or were, drafts", () => {
  const list = { builds: [{ id: A, code: "B-1" }] };
  it("refetches for a new or changed draft and for a build leaving the list, not for a booked build's move", () => {
    expect(parseChange(JSON.stringify({ e: "build", id: B, v: 2, s: "scheduled" }))).toEqual({ e: "build", id: B, v: 2, s: "scheduled" });
    expect(queryHears(["unscheduled"], list, [{ e: "build", id: B, v: 1, s: "draft" }])).toBe(true); // joins the list
    expect(queryHears(["unscheduled"], list, [{ e: "build", id: A, v: 2, s: "scheduled" }])).toBe(true); // leaves it
    expect(queryHears(["unscheduled"], list, [{ e: "build", id: B, v: 7, s: "scheduled" }])).toBe(false); // a booked build moved
    expect(queryHears(["unscheduled"], list, [{ e: "build", id: B, v: 7 }])).toBe(true); // no state said: as before
    expect(queryHears(["unscheduled"], list, [{ e: "unit", id: B, v: 7 }])).toBe(false);
    expect(queryHears(["unscheduled"], list, null)).toBe(true); // a resync
    // The floor's window still hears every build change.
    expect(queryHears(["floor", "a", "b"], null, [{ e: "build", id: B, v: 7, s: "scheduled" }])).toBe(true);
  });
});

describe("touchesWaitingWash", () => {
  it("keeps the board's waiting units for a wash batch's move and for units not yet printed, not for anything else", () => {
    expect(touchesWaitingWash({ e: "wash_batch", id: A, v: 3, s: "scheduled" })).toBe(false);
    expect(touchesWaitingWash({ e: "wash_batch", id: A, v: 2, s: "draft" })).toBe(false);
    expect(touchesWaitingWash({ e: "wash_batch", id: A, v: 4, s: "cancelled" })).toBe(true);
    expect(touchesWaitingWash({ e: "wash_batch", id: A, v: 4, s: "complete" })).toBe(true);
    expect(touchesWaitingWash({ e: "wash_batch", id: A, v: 4 })).toBe(true);
    expect(touchesWaitingWash({ e: "unit", id: A, v: 2, s: "planned" })).toBe(false);
    expect(touchesWaitingWash({ e: "unit", id: A, v: 2, s: "printing" })).toBe(false);
    expect(touchesWaitingWash({ e: "unit", id: A, v: 3, s: "green" })).toBe(true);
    expect(touchesWaitingWash({ e: "unit", id: A, v: 3, s: "scrapped" })).toBe(true);
    expect(touchesWaitingWash({ e: "unit", id: A, v: 3 })).toBe(true);
    expect(touchesWaitingWash({ e: "furnace_run", id: A, v: 3, s: "scheduled" })).toBe(true);
    expect(touchesWaitingWash({ e: "equipment" })).toBe(true);
    expect(touchesWaitingWash({ e: "build", id: A, v: 3, s: "scheduled" })).toBe(false);
    expect(touchesWaitingWash({ e: "inspection", id: A, unit: B })).toBe(false);
  });
});
