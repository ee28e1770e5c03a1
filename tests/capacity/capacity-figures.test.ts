import { describe, expect, it } from "vitest";
import { queueAhead, rangeInstants, utilizationReport, weeklyThroughput, wipByState, type CapacityResource } from "@/lib/capacity/summary";

// A hand-built week with answers worked out by hand (UTC, Monday 2 March 2026 to Sunday 8 March).
const t = (s: string) => new Date(`${s}Z`);
const P1: CapacityResource = {
  id: "p1", kind: "printer", name: "P1",
  bookings: [
    { start: t("2026-03-02T06:00:00"), end: t("2026-03-02T18:00:00") }, // 12 h on the 2nd
    { start: t("2026-03-03T20:00:00"), end: t("2026-03-04T08:00:00") }, // 4 h on the 3rd, 8 h on the 4th
    { start: t("2026-03-05T06:00:00"), end: t("2026-03-05T12:00:00") }, // 6 h on the 5th
  ],
  maintenance: [{ start: t("2026-03-05T00:00:00"), end: t("2026-03-05T06:00:00") }], // 6 h off on the 5th
};
const P2: CapacityResource = { id: "p2", kind: "printer", name: "P2", bookings: [], maintenance: [] };
const F1: CapacityResource = {
  id: "f1", kind: "furnace", name: "F1",
  bookings: [{ start: t("2026-03-06T12:00:00"), end: t("2026-03-07T12:00:00") }],
  maintenance: [],
};
const { from, to } = rangeInstants("2026-03-02", "2026-03-08", "UTC");

describe("utilization on a hand-built week", () => {
  it("takes the range as whole local days", () => {
    expect(from.toISOString()).toBe("2026-03-02T00:00:00.000Z");
    expect(to.toISOString()).toBe("2026-03-09T00:00:00.000Z");
  });

  it("gives busy over available hours per resource and day", () => {
    const { resources } = utilizationReport([P1, P2, F1], from, to, "UTC", "day");
    const p1 = resources.find((r) => r.resource_id === "p1")!;
    expect(p1.periods.map((p) => p.label)).toEqual(["2026-03-02", "2026-03-03", "2026-03-04", "2026-03-05", "2026-03-06", "2026-03-07", "2026-03-08"]);
    expect(p1.periods.map((p) => p.busy_hours)).toEqual([12, 4, 8, 6, 0, 0, 0]);
    expect(p1.periods.map((p) => p.available_hours)).toEqual([24, 24, 24, 18, 24, 24, 24]);
    expect(p1.periods[3].utilization).toBeCloseTo(6 / 18, 12);
    expect(p1.periods[3].maintenance_hours).toBe(6);
    const f1 = resources.find((r) => r.resource_id === "f1")!;
    expect(f1.periods.map((p) => p.busy_hours)).toEqual([0, 0, 0, 0, 12, 12, 0]);
  });

  it("gives the week's figure and pools a kind by hours, not by averaging percentages", () => {
    const { resources, kinds } = utilizationReport([P1, P2, F1], from, to, "UTC", "week");
    const p1 = resources.find((r) => r.resource_id === "p1")!;
    expect(p1.periods).toHaveLength(1);
    expect(p1.periods[0].busy_hours).toBe(30);
    expect(p1.periods[0].available_hours).toBe(162);
    expect(p1.total.utilization).toBeCloseTo(30 / 162, 12);
    const printers = kinds.find((k) => k.kind === "printer")!;
    // (30 + 0) / (162 + 168), not (30/162 + 0)/2
    expect(printers.total.utilization).toBeCloseTo(30 / 330, 12);
    expect(kinds.find((k) => k.kind === "furnace")!.total.utilization).toBeCloseTo(24 / 168, 12);
  });

  it("counts a daylight-saving day by its real length in the shop's zone", () => {
    // US clocks went forward on Sunday 8 March 2026: that local day in Detroit has 23 hours.
    const day = rangeInstants("2026-03-08", "2026-03-08", "America/Detroit");
    expect((day.to.getTime() - day.from.getTime()) / 3_600_000).toBe(23);
    const allDay: CapacityResource = { id: "w", kind: "wash_station", name: "W", bookings: [{ start: day.from, end: day.to }], maintenance: [] };
    const { resources } = utilizationReport([allDay], day.from, day.to, "America/Detroit", "day");
    expect(resources[0].periods[0].available_hours).toBe(23);
    expect(resources[0].periods[0].utilization).toBe(1);
  });

  it("refuses overlapping bookings on one resource rather than counting them twice", () => {
    const bad: CapacityResource = { ...P2, bookings: [
      { start: t("2026-03-02T00:00:00"), end: t("2026-03-02T10:00:00") },
      { start: t("2026-03-02T09:00:00"), end: t("2026-03-02T12:00:00") },
    ] };
    expect(() => utilizationReport([bad], from, to, "UTC", "day")).toThrow(/overlapping/);
  });
});

describe("work queued ahead of each resource", () => {
  it("counts the running booking's remainder and every later booking", () => {
    const rows = queueAhead([P1, P2, F1], t("2026-03-04T00:00:00"));
    const p1 = rows.find((r) => r.resource_id === "p1")!;
    expect(p1.hours_ahead).toBe(8 + 6);
    expect(p1.bookings_ahead).toBe(2);
    expect(p1.booked_until).toBe("2026-03-05T12:00:00.000Z");
    expect(rows.find((r) => r.resource_id === "p2")).toMatchObject({ hours_ahead: 0, bookings_ahead: 0, booked_until: null });
    expect(rows.find((r) => r.resource_id === "f1")!.hours_ahead).toBe(24);
  });
});

describe("throughput per week", () => {
  it("counts done and sintered units in their ISO weeks, inside the range only", () => {
    const range = rangeInstants("2026-03-04", "2026-03-12", "UTC");
    const events = [
      { at: t("2026-03-03T12:00:00"), to_state: "done" }, // before the range
      { at: t("2026-03-05T08:00:00"), to_state: "done" },
      { at: t("2026-03-06T08:00:00"), to_state: "sintered" },
      { at: t("2026-03-08T23:59:59"), to_state: "done" },
      { at: t("2026-03-09T00:00:00"), to_state: "done" }, // first instant of the next week
      { at: t("2026-03-12T23:00:00"), to_state: "done" },
      { at: t("2026-03-12T23:30:00"), to_state: "finishing" }, // not a throughput event
      { at: t("2026-03-13T00:00:00"), to_state: "done" }, // after the range
    ];
    const weeks = weeklyThroughput(events, range.from, range.to, "UTC");
    expect(weeks.map((w) => w.week)).toEqual(["2026-03-02", "2026-03-09"]);
    expect(weeks[0]).toMatchObject({ start: "2026-03-04T00:00:00.000Z", end: "2026-03-09T00:00:00.000Z", done: 2, sintered: 1 });
    expect(weeks[1]).toMatchObject({ done: 2, sintered: 0, end: "2026-03-13T00:00:00.000Z" });
  });
});

describe("work in progress by state", () => {
  it("lists every state in flow order, zeroes included, and leaves done and scrapped out", () => {
    const wip = wipByState([{ state: "brown" }, { state: "brown" }, { state: "finishing" }, { state: "done" }, { state: "scrapped" }, { state: "on_hold" }]);
    expect(wip.map((w) => w.state)).toEqual(["planned", "printing", "green", "washing", "brown", "sintering", "sintered", "ready_for_finishing", "finishing", "on_hold"]);
    expect(Object.fromEntries(wip.map((w) => [w.state, w.count]))).toMatchObject({ brown: 2, finishing: 1, on_hold: 1, planned: 0 });
    expect(wip.reduce((a, w) => a + w.count, 0)).toBe(4);
  });
});
