import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { utilization } from "@/lib/process/utilization";

const d = (iso: string) => new Date(iso);

describe("utilization", () => {
  it("per local day: busy over available, maintenance excluded, bookings clipped", () => {
    const [r] = utilization({
      from: d("2026-03-01T23:00:00Z"), // Monday 2 March 00:00 in Berlin
      to: d("2026-03-03T23:00:00Z"),
      timeZone: "Europe/Berlin",
      period: "day",
      resources: [
        {
          id: "printer-1",
          bookings: [
            { start: d("2026-03-01T20:00:00Z"), end: d("2026-03-02T05:00:00Z") }, // starts before the window
            { start: d("2026-03-02T05:00:00Z"), end: d("2026-03-02T11:00:00Z") }, // touches the first
            { start: d("2026-03-03T20:00:00Z"), end: d("2026-03-04T02:00:00Z") }, // runs past the window
          ],
          maintenance: [{ start: d("2026-03-03T06:00:00Z"), end: d("2026-03-03T10:00:00Z") }],
        },
      ],
    });
    expect(r.periods.map((p) => p.label)).toEqual(["2026-03-02", "2026-03-03"]);
    const [mon, tue] = r.periods;
    expect(mon.availableHours).toBe(24);
    expect(mon.busyHours).toBe(12); // 23:00–11:00 UTC
    expect(mon.utilization).toBe(0.5);
    expect(tue.maintenanceHours).toBe(4);
    expect(tue.availableHours).toBe(20);
    expect(tue.busyHours).toBe(3); // 20:00–23:00 UTC
    expect(tue.utilization).toBeCloseTo(3 / 20, 12);
    expect(r.total.busyHours).toBe(15);
    expect(r.total.availableHours).toBe(44);
  });

  it("the spring-forward day has 23 hours", () => {
    const [r] = utilization({
      from: d("2026-03-28T23:00:00Z"),
      to: d("2026-03-29T22:00:00Z"),
      timeZone: "Europe/Berlin",
      period: "day",
      resources: [{ id: "f", bookings: [{ start: d("2026-03-29T00:00:00Z"), end: d("2026-03-29T11:30:00Z") }] }],
    });
    expect(r.periods).toHaveLength(1);
    expect(r.periods[0].availableHours).toBe(23);
    expect(r.periods[0].utilization).toBeCloseTo(11.5 / 23, 12);
  });

  it("per week, Monday first; booked time inside maintenance does not count as busy", () => {
    const [r] = utilization({
      from: d("2026-03-04T00:00:00Z"), // a Wednesday
      to: d("2026-03-11T00:00:00Z"),
      timeZone: "UTC",
      period: "week",
      resources: [
        {
          id: "wash-1",
          bookings: [{ start: d("2026-03-08T10:00:00Z"), end: d("2026-03-09T10:00:00Z") }],
          maintenance: [
            { start: d("2026-03-08T20:00:00Z"), end: d("2026-03-09T02:00:00Z") },
            { start: d("2026-03-09T00:00:00Z"), end: d("2026-03-09T04:00:00Z") }, // overlaps the first: merged
          ],
        },
      ],
    });
    expect(r.periods.map((p) => p.label)).toEqual(["2026-03-02", "2026-03-09"]);
    const [w1, w2] = r.periods;
    expect(w1.start.toISOString()).toBe("2026-03-04T00:00:00.000Z"); // clipped to the window
    expect(w1.maintenanceHours).toBe(4);
    expect(w1.busyHours).toBe(10); // 10:00–20:00 on Sunday
    expect(w1.availableHours).toBe(5 * 24 - 4);
    expect(w2.maintenanceHours).toBe(4);
    expect(w2.busyHours).toBe(6); // 04:00–10:00 on Monday
    expect(w2.availableHours).toBe(48 - 4);
  });

  it("a period swallowed by maintenance has no utilization figure", () => {
    const [r] = utilization({
      from: d("2026-03-02T00:00:00Z"),
      to: d("2026-03-03T00:00:00Z"),
      timeZone: "UTC",
      period: "day",
      resources: [{ id: "x", maintenance: [{ start: d("2026-03-01T00:00:00Z"), end: d("2026-03-04T00:00:00Z") }] }],
    });
    expect(r.periods[0].utilization).toBeNull();
    expect(r.periods[0].availableHours).toBe(0);
  });

  it("overlapping bookings on one resource are an error", () => {
    expect(() =>
      utilization({
        from: d("2026-03-02T00:00:00Z"),
        to: d("2026-03-03T00:00:00Z"),
        timeZone: "UTC",
        period: "day",
        resources: [
          {
            id: "printer-2",
            bookings: [
              { start: d("2026-03-02T01:00:00Z"), end: d("2026-03-02T05:00:00Z") },
              { start: d("2026-03-02T04:59:00Z"), end: d("2026-03-02T06:00:00Z") },
            ],
          },
        ],
      }),
    ).toThrow(/overlapping bookings/);
  });

  it("bad windows and zones throw ComputationError", () => {
    const base = { timeZone: "UTC", period: "day" as const, resources: [] };
    expect(() => utilization({ ...base, from: d("2026-03-03T00:00:00Z"), to: d("2026-03-02T00:00:00Z") })).toThrow(ComputationError);
    expect(() =>
      utilization({ ...base, timeZone: "Nowhere/City", from: d("2026-03-02T00:00:00Z"), to: d("2026-03-03T00:00:00Z") }),
    ).toThrow(ComputationError);
  });
});
