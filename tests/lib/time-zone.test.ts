import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { isStaffed, nextStaffedTime, offsetMs, staffedIntervals, zonedParts, zonedTimeToUtc } from "@/lib/process/time-zone";

const weekdays = [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" }));
const berlin = "Europe/Berlin";
const next = (iso: string, pattern = weekdays, tz = berlin) => nextStaffedTime(new Date(iso), pattern, tz).toISOString();

describe("zoned wall-clock arithmetic", () => {
  it("reads local parts and offsets", () => {
    const p = zonedParts(Date.parse("2026-03-02T23:30:00Z"), berlin);
    expect(p).toMatchObject({ year: 2026, month: 3, day: 3, hour: 0, minute: 30, weekday: 2 });
    expect(offsetMs(Date.parse("2026-01-15T12:00:00Z"), berlin)).toBe(3_600_000);
    expect(offsetMs(Date.parse("2026-07-15T12:00:00Z"), berlin)).toBe(7_200_000);
    expect(offsetMs(Date.parse("2026-07-15T12:00:00Z"), "America/New_York")).toBe(-4 * 3_600_000);
  });

  it("local → UTC, across both daylight-saving changes (Berlin 2026: 29 March, 25 October)", () => {
    expect(new Date(zonedTimeToUtc({ year: 2026, month: 3, day: 2 }, 6 * 60, berlin)).toISOString()).toBe("2026-03-02T05:00:00.000Z");
    // 02:30 does not exist on 29 March: moved on by the hour gap to 03:30 CEST.
    expect(new Date(zonedTimeToUtc({ year: 2026, month: 3, day: 29 }, 150, berlin)).toISOString()).toBe("2026-03-29T01:30:00.000Z");
    // 02:30 happens twice on 25 October: the earlier (CEST) instant.
    expect(new Date(zonedTimeToUtc({ year: 2026, month: 10, day: 25 }, 150, berlin)).toISOString()).toBe("2026-10-25T00:30:00.000Z");
  });
});

describe("nextStaffedTime", () => {
  it("inside a shift returns the same instant", () => {
    expect(next("2026-03-02T09:00:00Z")).toBe("2026-03-02T09:00:00.000Z");
    expect(isStaffed(new Date("2026-03-02T09:00:00Z"), weekdays, berlin)).toBe(true);
  });

  it("after the evening shift, the next morning at 06:00 local", () => {
    expect(next("2026-03-02T22:00:00Z")).toBe("2026-03-03T05:00:00.000Z");
  });

  it("the end of a shift is not staffed; Friday night waits for Monday", () => {
    expect(next("2026-03-06T21:00:00Z")).toBe("2026-03-09T05:00:00.000Z");
    expect(isStaffed(new Date("2026-03-06T21:00:00Z"), weekdays, berlin)).toBe(false);
  });

  it("Monday after the spring change starts at 06:00 CEST = 04:00 UTC", () => {
    expect(next("2026-03-28T12:00:00Z")).toBe("2026-03-30T04:00:00.000Z");
  });

  it("a shift starting in the spring-forward gap starts at the first real minute after it", () => {
    expect(next("2026-03-29T00:00:00Z", [{ day: 0, start: "02:30", end: "05:00" }])).toBe("2026-03-29T01:30:00.000Z");
  });

  it("overnight shifts run past midnight", () => {
    const nights = [{ day: 5, start: "22:00", end: "06:00" }];
    // Saturday 03:00 local (02:00 UTC) is inside Friday's night shift.
    expect(next("2026-03-07T02:00:00Z", nights)).toBe("2026-03-07T02:00:00.000Z");
    expect(next("2026-03-07T06:00:00Z", nights)).toBe("2026-03-13T21:00:00.000Z");
  });

  it("an end of 24:00 covers the whole evening", () => {
    const late = [{ day: 1, start: "18:00", end: "24:00" }];
    expect(next("2026-03-02T22:59:00Z", late)).toBe("2026-03-02T22:59:00.000Z");
    expect(next("2026-03-02T23:00:00Z", late)).toBe("2026-03-09T17:00:00.000Z");
  });

  it("other zones", () => {
    expect(next("2026-03-02T09:00:00Z", weekdays, "America/New_York")).toBe("2026-03-02T11:00:00.000Z");
    expect(next("2026-03-02T09:00:00Z", weekdays, "UTC")).toBe("2026-03-02T09:00:00.000Z");
  });

  it("bad input throws ComputationError", () => {
    expect(() => next("2026-03-02T09:00:00Z", [])).toThrow(ComputationError);
    expect(() => next("2026-03-02T09:00:00Z", weekdays, "Mars/Olympus")).toThrow(ComputationError);
    expect(() => next("2026-03-02T09:00:00Z", [{ day: 7, start: "06:00", end: "07:00" }])).toThrow(ComputationError);
    expect(() => next("2026-03-02T09:00:00Z", [{ day: 1, start: "6:00", end: "07:00" }])).toThrow(ComputationError);
    expect(() => next("2026-03-02T09:00:00Z", [{ day: 1, start: "07:00", end: "07:00" }])).toThrow(ComputationError);
    expect(() => nextStaffedTime(new Date("x"), weekdays, berlin)).toThrow(ComputationError);
  });
});

describe("staffedIntervals, asked again", () => {
  // Kept answers (the board asks for the same days once per unit) must be the answers: the same
  // intervals, whatever the first caller did with its copy, and a change of zone, days or
  // pattern is a different question.
  const pattern = [
    { day: 1, start: "22:00", end: "06:00" },
    { day: 0, start: "01:00", end: "04:00" },
  ];
  const spring = { year: 2026, month: 3, day: 7 }; // the US springs forward on Sunday 8 March 2026

  it("answers the same intervals, unaffected by what a caller did to an earlier answer", () => {
    const first = staffedIntervals(spring, 10, pattern, "America/Chicago");
    const expected = first.map(([s, e]) => [s, e]);
    first[0][0] = 0;
    first.pop();
    expect(staffedIntervals(spring, 10, pattern, "America/Chicago")).toEqual(expected);
    // Sunday 8 March 01:00 CST is 07:00Z; 04:00 local is CDT by then (09:00Z): a two-hour shift.
    expect(expected[0]).toEqual([Date.UTC(2026, 2, 8, 7), Date.UTC(2026, 2, 8, 9)]);
  });

  it("keeps zones, days and patterns apart", () => {
    const chicago = staffedIntervals(spring, 10, pattern, "America/Chicago");
    expect(staffedIntervals(spring, 10, pattern, "Europe/Berlin")).not.toEqual(chicago);
    expect(staffedIntervals(spring, 3, pattern, "America/Chicago")).toEqual(chicago.filter(([s]) => s < Date.UTC(2026, 2, 10, 6)));
    expect(staffedIntervals(spring, 10, [pattern[1]], "America/Chicago")).toHaveLength(2);
    expect(() => staffedIntervals(spring, 10, pattern, "Mars/Olympus")).toThrow();
  });
});
