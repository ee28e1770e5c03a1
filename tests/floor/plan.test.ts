import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { earliestGap, planFloor as planPrinters, staffedHoursFor } from "@/lib/floor/plan";

// The floor's printer plan (lib/planning/printer-plan behind the floor's translation): earliest
// due date first, never over a blocked interval, never two on one printer at once, each build
// timed with its own print time on the printer it got.

const H = 3_600_000;
const id = (t: number) => t;

describe("earliestGap", () => {
  it("skips every blocked interval the job would touch; touching ends are fine", () => {
    const blocked: Array<[number, number]> = [[2 * H, 4 * H], [5 * H, 6 * H]];
    expect(earliestGap(blocked, 0, 120, id, Infinity)).toBe(0); // [0, 2h) touches [2h, 4h)
    expect(earliestGap(blocked, 0, 121, id, Infinity)).toBe(6 * H);
    expect(earliestGap(blocked, 3 * H, 60, id, Infinity)).toBe(4 * H);
  });
  it("waits for staffed hours to start", () => {
    const onTheHourOfEight = (t: number) => Math.max(t, 8 * H);
    expect(earliestGap([], H, 30, onTheHourOfEight, Infinity)).toBe(8 * H);
  });
});

describe("planPrinters", () => {
  it("orders by due date and puts each build where it finishes first (Jackson's EDD on one printer)", () => {
    const r = planPrinters({
      now: 0,
      printers: [{ id: "p", blocked: [] }],
      builds: [
        { id: "late-due", due: 20 * H, minutes: { p: 60 } },
        { id: "early-due", due: 2 * H, minutes: { p: 120 } },
        { id: "no-due", due: null, minutes: { p: 30 } },
      ],
    });
    expect(r.items.map((i) => i.build_id)).toEqual(["early-due", "late-due", "no-due"]);
    expect(r.metrics).toMatchObject({ placed: 3, late_count: 0, max_lateness_min: 0, makespan_min: 210, makespan_lower_bound_min: 210 });
    expect(r.items.map((i) => [i.start / 60_000, i.end / 60_000])).toEqual([[0, 120], [120, 180], [180, 210]]);
  });

  it("plans with the longest print time, then re-times each printer with its own, so builds move up", () => {
    const r = planPrinters({
      now: 0,
      printers: [{ id: "fast", blocked: [] }, { id: "slow", blocked: [[0, 100 * H]] }],
      builds: [
        { id: "x", due: 3 * H, minutes: { fast: 60, slow: 240 } },
        { id: "y", due: 4 * H, minutes: { fast: 60, slow: 240 } },
      ],
    });
    expect(r.items).toEqual([
      { build_id: "x", printer_id: "fast", start: 0, end: H, lateness_min: 0 },
      { build_id: "y", printer_id: "fast", start: H, end: 2 * H, lateness_min: 0 },
    ]);
  });

  it("reports lateness against the due date", () => {
    const r = planPrinters({ now: 0, printers: [{ id: "p", blocked: [[0, H]] }], builds: [{ id: "b", due: 90 * 60_000, minutes: { p: 60 } }] });
    expect(r.items[0]).toMatchObject({ printer_id: "p", start: H, end: 2 * H, lateness_min: 30 });
    expect(r.metrics).toMatchObject({ late_count: 1, max_lateness_min: 30 });
  });

  it("starts builds only in staffed hours", () => {
    // Monday 2026-11-30 00:00 UTC; one shift on Mondays 08:00 to 16:00 UTC
    const monday = Date.parse("2026-11-30T00:00:00Z");
    const staffed = staffedHoursFor([{ day: 1, start: "08:00", end: "16:00" }], "UTC");
    const r = planPrinters({ now: monday, staffed, printers: [{ id: "p", blocked: [] }], builds: [{ id: "a", due: null, minutes: { p: 600 } }, { id: "b", due: null, minutes: { p: 60 } }] });
    for (const item of r.items) {
      const hour = new Date(item.start).getUTCHours() + new Date(item.start).getUTCMinutes() / 60;
      expect(new Date(item.start).getUTCDay()).toBe(1);
      expect(hour >= 8 && hour < 16).toBe(true);
    }
    expect(staffedHoursFor([], "UTC")).toBeNull();
  });

  it("leaves a build no printer can take unplaced, with the reason", () => {
    const r = planPrinters({ now: 0, printers: [{ id: "p", blocked: [] }], builds: [{ id: "x", due: null, minutes: {} }] });
    expect(r.unplaced).toEqual([{ build_id: "x", reason: expect.stringMatching(/no printer/) }]);
  });

  it("never double-books and never overlaps a blocked window, and the makespan is at least its lower bound (property)", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 4 }),
        fc.array(fc.record({ due: fc.option(fc.integer({ min: 0, max: 200 }), { nil: null }), minutes: fc.array(fc.option(fc.integer({ min: 10, max: 600 }), { nil: null }), { minLength: 4, maxLength: 4 }) }), { maxLength: 30 }),
        fc.array(fc.tuple(fc.integer({ min: 0, max: 3 }), fc.integer({ min: 0, max: 100 }), fc.integer({ min: 1, max: 20 })), { maxLength: 8 }),
        (nPrinters, specs, blocks) => {
          const printers = Array.from({ length: nPrinters }, (_, i) => ({
            id: `p${i}`,
            blocked: blocks.filter(([p]) => p === i).map(([, s, d]) => [s * H, (s + d) * H] as [number, number]),
          }));
          const builds = specs.map((s, i) => ({
            id: `b${i}`,
            due: s.due === null ? null : s.due * H,
            minutes: Object.fromEntries(s.minutes.slice(0, nPrinters).map((m, p) => [`p${p}`, m]).filter(([, m]) => m !== null)) as Record<string, number>,
          }));
          const r = planPrinters({ now: 0, printers, builds });
          expect(r.items.length + r.unplaced.length).toBe(builds.length);
          for (const p of printers) {
            const mine = r.items.filter((i) => i.printer_id === p.id).sort((a, b) => a.start - b.start);
            for (let k = 1; k < mine.length; k++) expect(mine[k].start).toBeGreaterThanOrEqual(mine[k - 1].end);
            for (const item of mine) for (const [s, e] of p.blocked) expect(item.end <= s || item.start >= e).toBe(true);
          }
          for (const item of r.items) {
            const b = builds.find((x) => x.id === item.build_id)!;
            expect(b.minutes[item.printer_id]).toBeDefined();
            expect(item.end - item.start).toBe(b.minutes[item.printer_id] * 60_000);
            expect(Number.isFinite(item.lateness_min)).toBe(true);
          }
          if (r.items.length) expect(r.metrics.makespan_min).toBeGreaterThanOrEqual(r.metrics.makespan_lower_bound_min - 1e-9);
        },
      ),
      { numRuns: 200 },
    );
  });
});
