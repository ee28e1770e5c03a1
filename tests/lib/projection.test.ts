import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { projectOrder, projectUnit, type UnitProjectionInput } from "@/lib/process/projection";

const now = new Date("2026-03-02T08:00:00Z"); // Monday 09:00 in Berlin
const H = 3_600_000;
const at = (ms: number) => new Date(now.getTime() + ms);
const unbooked = (minutes: number) => ({ status: "unbooked" as const, minutes });
const staffing = {
  pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })),
  timeZone: "Europe/Berlin",
};

function input(overrides: Partial<UnitProjectionInput> = {}): UnitProjectionInput {
  return {
    now,
    dueAt: at(100 * H),
    steps: {
      print: unbooked(600),
      wash: unbooked(240),
      drying: unbooked(120),
      furnace: unbooked(571),
      finishing: unbooked(1440),
    },
    atRiskMarginMinutes: 1440,
    ...overrides,
  };
}

describe("unit projection", () => {
  it("without bookings or staffing: now + the sum of the durations", () => {
    const p = projectUnit(input());
    const total = 600 + 240 + 120 + 571 + 1440;
    expect(p.projectedEnd.getTime()).toBe(now.getTime() + total * 60_000);
    expect(p.steps.map((s) => s.source)).toEqual(["estimated", "estimated", "estimated", "estimated", "estimated"]);
    expect(p.slackMinutes).toBeCloseTo(6000 - total, 9);
    expect(p.status).toBe("on_time");
  });

  it("a booked step keeps its booked end and later steps queue after it", () => {
    const p = projectUnit(
      input({
        steps: {
          print: { status: "done", end: at(-5 * H) },
          wash: { status: "booked", start: at(2 * H), end: at(6 * H) },
          drying: unbooked(120),
          furnace: { status: "booked", start: at(10 * H), end: at(20 * H) },
          finishing: unbooked(60),
        },
      }),
    );
    expect(p.steps[1].end).toEqual(at(6 * H));
    expect(p.steps[2].start).toEqual(at(6 * H));
    expect(p.steps[2].end).toEqual(at(8 * H));
    expect(p.steps[3].end).toEqual(at(20 * H));
    expect(p.projectedEnd).toEqual(at(21 * H));
    expect(p.steps.every((s) => !s.startsBeforePrevious)).toBe(true);
  });

  it("flags a booking that starts before the step it follows ends", () => {
    const p = projectUnit(
      input({
        steps: {
          print: { status: "booked", start: at(0), end: at(10 * H) },
          wash: { status: "booked", start: at(5 * H), end: at(9 * H) },
          drying: unbooked(0),
          furnace: unbooked(0),
          finishing: unbooked(0),
        },
      }),
    );
    expect(p.steps[1].startsBeforePrevious).toBe(true);
    expect(p.projectedEnd).toEqual(at(10 * H));
  });

  it("unbooked work is never placed in the past", () => {
    const p = projectUnit(input({ steps: { ...input().steps, print: { status: "done", end: at(-48 * H) } } }));
    expect(p.steps[1].start).toEqual(now);
  });

  it("a wash that would start at night waits for the morning shift; so does unloading", () => {
    // Print 13 h from Monday 09:00 local ends 22:00 local, as the shift ends: wash waits
    // until Tuesday 06:00 local (05:00 UTC).
    const p = projectUnit(
      input({
        steps: {
          print: unbooked(13 * 60),
          wash: unbooked(60),
          drying: unbooked(60),
          furnace: unbooked(600),
          finishing: unbooked(0),
        },
        staffing,
      }),
    );
    expect(p.steps[1].start!.toISOString()).toBe("2026-03-03T05:00:00.000Z");
    // Drying ends 08:00 local; the furnace runs 10 h to 18:00 local, inside the shift.
    expect(p.steps[3].end!.toISOString()).toBe("2026-03-03T17:00:00.000Z");
  });

  it("a furnace run ending at night is unloaded next morning", () => {
    const p = projectUnit(
      input({
        steps: {
          print: { status: "done", end: at(-1 * H) },
          wash: { status: "done", end: at(-1 * H) },
          drying: { status: "done", end: at(-1 * H) },
          furnace: unbooked(14 * 60), // 09:00 → 23:00 local Monday
          finishing: unbooked(0),
        },
        staffing,
      }),
    );
    expect(p.steps[3].end!.toISOString()).toBe("2026-03-03T05:00:00.000Z");
  });

  it("on time / at risk / late against the due date and margin", () => {
    const total = (600 + 240 + 120 + 571 + 1440) * 60_000;
    const end = now.getTime() + total;
    expect(projectUnit(input({ dueAt: new Date(end + 25 * H) })).status).toBe("on_time");
    expect(projectUnit(input({ dueAt: new Date(end + 23 * H) })).status).toBe("at_risk");
    expect(projectUnit(input({ dueAt: new Date(end) })).status).toBe("at_risk");
    expect(projectUnit(input({ dueAt: new Date(end - 1) })).status).toBe("late");
  });

  it("invalid input throws", () => {
    expect(() => projectUnit(input({ now: new Date("x") }))).toThrow(ComputationError);
    expect(() =>
      projectUnit(input({ steps: { ...input().steps, wash: { status: "booked", start: at(5 * H), end: at(4 * H) } } })),
    ).toThrow(ComputationError);
    expect(() => projectUnit(input({ steps: { ...input().steps, wash: unbooked(-1) } }))).toThrow(ComputationError);
  });
});

describe("order projection", () => {
  it("is the latest unit", () => {
    const a = projectUnit(input());
    const b = projectUnit(input({ steps: { ...input().steps, finishing: unbooked(4000) } }));
    const o = projectOrder(at(60 * H), [a, b], 1440);
    expect(o.latestUnitIndex).toBe(1);
    expect(o.projectedEnd).toEqual(b.projectedEnd);
    expect(o.status).toBe("late");
    expect(() => projectOrder(at(0), [], 0)).toThrow(ComputationError);
  });
});
