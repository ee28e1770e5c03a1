import { projectOrder, projectUnit, type ProjectionStatus, type StepState, type UnitProjection } from "@/lib/process/projection";
import type { WeeklyPattern } from "@/lib/process/time-zone";

// Turns what the database knows about a unit (its state, its build, wash batch and furnace
// run) into the step states the projection in lib/process needs. A step the unit is past is
// done; a booking on the calendar keeps its own times; anything else is estimated.

const DEPTH: Record<string, number> = {
  planned: 0, printing: 1, green: 2, washing: 3, brown: 4, sintering: 5, sintered: 6,
  ready_for_finishing: 7, finishing: 8, done: 9,
};

type Booking = { state: string | null; starts_at: Date | null; ends_at: Date | null; finished_at?: Date | null } | null;

export type UnitProjectionRow = {
  state: string;
  held_from: string | null;
  state_changed_at: Date;
  due_at: Date;
  build: Booking;
  wash: Booking;
  furnace: Booking;
  /** Estimates for steps not yet booked, minutes. */
  print_minutes: number;
  wash_minutes: number;
  furnace_minutes: number;
};

export type ShopTiming = {
  drying_minutes: number;
  finishing_lead_minutes: number;
  at_risk_margin_minutes: number;
  time_zone: string;
  staffed_hours: WeeklyPattern;
};

export type ProjectionSummary = { status: ProjectionStatus | "scrapped"; projected_end: string | null; slack_minutes: number | null };

function step(depth: number, doneAt: number, booking: Booking, minutes: number, fallbackEnd: Date): StepState {
  if (depth >= doneAt) {
    return { status: "done", end: booking?.finished_at ?? booking?.ends_at ?? fallbackEnd };
  }
  if (booking && (booking.state === "scheduled" || booking.state === "running") && booking.starts_at && booking.ends_at && booking.starts_at < booking.ends_at) {
    return { status: "booked", start: booking.starts_at, end: booking.ends_at };
  }
  return { status: "unbooked", minutes: Math.max(0, minutes) };
}

export function projectUnitRow(row: UnitProjectionRow, shop: ShopTiming, now: Date): UnitProjection | null {
  if (row.state === "scrapped") return null;
  const effective = row.state === "on_hold" ? (row.held_from ?? "planned") : row.state;
  const depth = DEPTH[effective] ?? 0;
  const fallback = row.state_changed_at;
  return projectUnit({
    now,
    dueAt: row.due_at,
    atRiskMarginMinutes: shop.at_risk_margin_minutes,
    staffing: shop.staffed_hours.length ? { pattern: shop.staffed_hours, timeZone: shop.time_zone } : undefined,
    steps: {
      print: step(depth, 2, row.build, row.print_minutes, fallback),
      wash: step(depth, 4, row.wash, row.wash_minutes, fallback),
      drying: depth >= 4 ? { status: "done", end: fallback } : { status: "unbooked", minutes: shop.drying_minutes },
      furnace: step(depth, 6, row.furnace, row.furnace_minutes, fallback),
      finishing: depth >= 9 ? { status: "done", end: fallback } : { status: "unbooked", minutes: shop.finishing_lead_minutes },
    },
  });
}

export function summarize(p: UnitProjection | null): ProjectionSummary {
  if (!p) return { status: "scrapped", projected_end: null, slack_minutes: null };
  return { status: p.status, projected_end: p.projectedEnd.toISOString(), slack_minutes: Math.round(p.slackMinutes) };
}

/** An order finishes with its last live unit; an order with none has no projection. */
export function summarizeOrder(dueAt: Date, units: Array<UnitProjection | null>, marginMinutes: number): ProjectionSummary | null {
  const live = units.filter((u): u is UnitProjection => u !== null);
  if (live.length === 0) return null;
  const o = projectOrder(dueAt, live, marginMinutes);
  return { status: o.status, projected_end: o.projectedEnd.toISOString(), slack_minutes: Math.round(o.slackMinutes) };
}
