import { describe, expect, it } from "vitest";
import { orderRisks, projectUnitRow, unitSteps, type UnitForProjection } from "@/lib/capacity/projection-input";

// Hand-built chains through print → wash → drying → furnace → finishing with known answers.
const t = (s: string) => new Date(`${s}Z`);
const MIN = 60_000;
const timing = { drying_minutes: 120, finishing_lead_minutes: 2880, at_risk_margin_minutes: 1440 };
const estimates = { print: 600, wash: 240, furnace: 571 };
const none = null;

const planned: UnitForProjection = { state: "planned", held_from: null, state_changed_at: t("2026-03-01T00:00:00"), build: none, wash: none, run: none, estimates };

describe("projected completion of one unit", () => {
  it("queues every unbooked step after now when nothing is booked", () => {
    const now = t("2026-03-06T20:00:00");
    const p = projectUnitRow(planned, t("2026-03-20T00:00:00"), timing, now)!;
    // 600 + 240 + 120 + 571 + 2880 = 4411 min after now
    expect(p.projectedEnd.getTime()).toBe(now.getTime() + 4411 * MIN);
    expect(p.status).toBe("on_time");
  });

  it("waits for staffed hours to start the wash and the furnace and to unload", () => {
    // Staffed Monday to Friday 06:00–22:00 UTC. Friday 20:00: the print starts at once and
    // ends Saturday 06:00; the wash waits for Monday 06:00 (ends 10:00); drying to 12:00; the
    // furnace starts 12:00 and ends 21:31, inside the shift; finishing 48 h → Wednesday 21:31.
    const staffing = { timeZone: "UTC", pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })) };
    const now = t("2026-03-06T20:00:00");
    const p = projectUnitRow(planned, t("2026-03-12T12:00:00"), { ...timing, staffing }, now)!;
    const ends = Object.fromEntries(p.steps.map((s) => [s.step, s.end.toISOString()]));
    expect(ends).toEqual({
      print: "2026-03-07T06:00:00.000Z",
      wash: "2026-03-09T10:00:00.000Z",
      drying: "2026-03-09T12:00:00.000Z",
      furnace: "2026-03-09T21:31:00.000Z",
      finishing: "2026-03-11T21:31:00.000Z",
    });
    // due Thursday 12:00: 14 h 29 min of slack, inside the 24 h margin
    expect(p.slackMinutes).toBe(14 * 60 + 29);
    expect(p.status).toBe("at_risk");
  });

  it("uses a booked furnace run's own end for a brown unit", () => {
    const unit: UnitForProjection = {
      ...planned,
      state: "brown",
      state_changed_at: t("2026-03-05T10:00:00"),
      build: { state: "complete", starts_at: t("2026-03-03T00:00:00"), ends_at: t("2026-03-04T00:00:00") },
      wash: { state: "complete", starts_at: t("2026-03-04T02:00:00"), ends_at: t("2026-03-05T08:00:00") },
      run: { state: "scheduled", starts_at: t("2026-03-06T08:00:00"), ends_at: t("2026-03-06T20:00:00") },
    };
    const steps = unitSteps(unit, timing, t("2026-03-06T00:00:00"))!;
    expect(steps.print.status).toBe("done");
    expect(steps.wash.status).toBe("done");
    expect(steps.furnace).toEqual({ status: "booked", start: t("2026-03-06T08:00:00"), end: t("2026-03-06T20:00:00") });
    const p = projectUnitRow(unit, t("2026-03-08T00:00:00"), timing, t("2026-03-06T00:00:00"))!;
    expect(p.projectedEnd.toISOString()).toBe("2026-03-08T20:00:00.000Z"); // run end + 48 h
    expect(p.status).toBe("late");
    expect(p.slackMinutes).toBe(-20 * 60);
  });

  it("counts only the rest of the finishing lead time for a unit already in finishing", () => {
    const unit: UnitForProjection = { ...planned, state: "finishing", state_changed_at: t("2026-03-06T00:00:00") };
    const p = projectUnitRow(unit, t("2026-03-20T00:00:00"), timing, t("2026-03-07T00:00:00"))!;
    expect(p.projectedEnd.toISOString()).toBe("2026-03-08T00:00:00.000Z"); // 48 h from the start of finishing
  });

  it("projects a held unit from where it was held and leaves scrapped units out", () => {
    const held: UnitForProjection = { ...planned, state: "on_hold", held_from: "ready_for_finishing" };
    const steps = unitSteps(held, timing, t("2026-03-06T00:00:00"))!;
    expect(steps.furnace.status).toBe("done");
    expect(steps.finishing).toEqual({ status: "unbooked", minutes: 2880 });
    expect(unitSteps({ ...planned, state: "scrapped" }, timing, t("2026-03-06T00:00:00"))).toBeUndefined();
  });
});

describe("late and at-risk orders", () => {
  const now = t("2026-03-06T00:00:00");
  const inFinishing = (serial: string): UnitForProjection & { serial: string } => ({ ...planned, serial, state: "ready_for_finishing", state_changed_at: now });
  const orders = [
    // The order finishes with its last unit: the planned one, 4411 min from now (9 Mar 01:31).
    { id: "a", code: "WO-A", customer: "A", due_at: t("2026-03-08T00:00:00"), priority: 2, units: [inFinishing("A-1"), { ...planned, serial: "A-2" }] },
    // 48 h of finishing: ends 8 Mar 00:00, due 8 Mar 12:00 → at risk (12 h < 24 h margin).
    { id: "b", code: "WO-B", customer: "B", due_at: t("2026-03-08T12:00:00"), priority: 3, units: [inFinishing("B-1")] },
    // Plenty of time.
    { id: "c", code: "WO-C", customer: "C", due_at: t("2026-03-30T00:00:00"), priority: 3, units: [inFinishing("C-1"), { ...planned, serial: "C-2", state: "scrapped" }] },
    // Finished orders are not listed.
    { id: "d", code: "WO-D", customer: "D", due_at: t("2026-03-01T00:00:00"), priority: 1, units: [{ ...planned, serial: "D-1", state: "done" }] },
  ];

  it("orders them late first, then at risk, then on time, each with its last unit", () => {
    const risks = orderRisks(orders, timing, now);
    expect(risks.map((r) => [r.code, r.status])).toEqual([["WO-A", "late"], ["WO-B", "at_risk"], ["WO-C", "on_time"]]);
    expect(risks[0]).toMatchObject({ latest_serial: "A-2", latest_state: "planned", projected_end: "2026-03-09T01:31:00.000Z", units_total: 2 });
    expect(risks[0].slack_minutes).toBe(-(25 * 60 + 31));
    expect(risks[2]).toMatchObject({ units_scrapped: 1, units_total: 2 });
  });
});
