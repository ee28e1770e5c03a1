import { describe, expect, it } from "vitest";
import { projectUnitRow, summarize, summarizeOrder, type ShopTiming, type UnitProjectionRow } from "@/lib/parts/projection";

// How a unit's state and bookings become the projection's steps.

const shop: ShopTiming = { drying_minutes: 120, finishing_lead_minutes: 1440, at_risk_margin_minutes: 1440, time_zone: "UTC", staffed_hours: [] };
const now = new Date("2026-12-01T00:00:00Z");
const H = 3_600_000;
const base: UnitProjectionRow = {
  state: "planned", held_from: null, state_changed_at: now, due_at: new Date(now.getTime() + 10 * 24 * H),
  build: null, wash: null, furnace: null, print_minutes: 600, wash_minutes: 300, furnace_minutes: 900,
};

describe("unit projection rows", () => {
  it("adds every step's estimate for a planned unit with nothing booked", () => {
    const p = projectUnitRow(base, shop, now)!;
    // 600 + 300 + 120 + 900 + 1440 minutes
    expect(p.projectedEnd.getTime() - now.getTime()).toBe((600 + 300 + 120 + 900 + 1440) * 60_000);
    expect(p.status).toBe("on_time");
  });

  it("uses a booked build's own end, and counts steps the unit is past as done", () => {
    const booked = projectUnitRow({ ...base, build: { state: "scheduled", starts_at: new Date(now.getTime() + 48 * H), ends_at: new Date(now.getTime() + 60 * H) } }, shop, now)!;
    expect(booked.steps[0]).toMatchObject({ step: "print", source: "booked" });
    expect(booked.projectedEnd.getTime()).toBe(now.getTime() + 60 * H + (300 + 120 + 900 + 1440) * 60_000);
    const brown = projectUnitRow({ ...base, state: "brown" }, shop, now)!;
    expect(brown.steps.filter((s) => s.source === "done").map((s) => s.step)).toEqual(["print", "wash", "drying"]);
    expect(brown.projectedEnd.getTime()).toBe(now.getTime() + (900 + 1440) * 60_000);
  });

  it("calls a unit late when its due date is before the projected end; scrapped units have none", () => {
    const late = projectUnitRow({ ...base, due_at: new Date(now.getTime() + 24 * H) }, shop, now)!;
    expect(summarize(late).status).toBe("late");
    expect(summarize(projectUnitRow({ ...base, state: "scrapped" }, shop, now))).toEqual({ status: "scrapped", projected_end: null, slack_minutes: null });
    const onTime = projectUnitRow(base, shop, now)!;
    const slow = projectUnitRow({ ...base, print_minutes: 6000 }, shop, now)!;
    // an order finishes with its last unit; the scrapped one does not count
    const order = summarizeOrder(base.due_at, [onTime, slow, null], 1440)!;
    expect(order.projected_end).toBe(slow.projectedEnd.toISOString());
    expect(order.status).toBe(slow.status);
    expect(summarizeOrder(base.due_at, [null], 1440)).toBeNull();
  });
});
