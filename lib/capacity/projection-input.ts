import { projectOrder, projectUnit, type ProjectionStatus, type StepState, type UnitProjection } from "@/lib/process/projection";
import type { WeeklyPattern } from "@/lib/process/time-zone";

// Turns a unit's state and the bookings it sits in into the step states the projection
// takes: what has happened is done, what is on a calendar is booked, the rest is estimated.

const DEPTH = {
  planned: 0, printing: 1, green: 2, washing: 3, brown: 4, sintering: 5, sintered: 6,
  ready_for_finishing: 7, finishing: 8, done: 9,
} as const;
type FlowState = keyof typeof DEPTH;

export type BookingRef = {
  state: "draft" | "scheduled" | "running" | "complete" | "cancelled";
  starts_at: Date | null;
  ends_at: Date | null;
  /** When it really ended, if recorded (build finished, wash finished, furnace unloaded). */
  actual_end?: Date | null;
} | null;

export type UnitForProjection = {
  state: string;
  held_from: string | null;
  state_changed_at: Date;
  build: BookingRef;
  wash: BookingRef;
  run: BookingRef;
  /** Durations for steps that are not booked yet, minutes. */
  estimates: { print: number; wash: number; furnace: number };
};

export type ShopTiming = {
  drying_minutes: number;
  finishing_lead_minutes: number;
  at_risk_margin_minutes: number;
  staffing?: { pattern: WeeklyPattern; timeZone: string };
};

const live = (b: BookingRef): b is NonNullable<BookingRef> & { starts_at: Date; ends_at: Date } =>
  !!b && (b.state === "scheduled" || b.state === "running") && !!b.starts_at && !!b.ends_at && b.starts_at < b.ends_at;

const endOf = (b: BookingRef, fallback: Date) => b?.actual_end ?? b?.ends_at ?? fallback;

/** Depth of a unit in the flow; a held unit counts where it was held from. */
export function flowDepth(state: string, heldFrom: string | null): number | undefined {
  if (state === "scrapped") return undefined;
  if (state === "on_hold") return DEPTH[(heldFrom ?? "brown") as FlowState] ?? DEPTH.brown;
  return DEPTH[state as FlowState];
}

export function unitSteps(unit: UnitForProjection, timing: ShopTiming, now: Date): Record<"print" | "wash" | "drying" | "furnace" | "finishing", StepState> | undefined {
  const depth = flowDepth(unit.state, unit.held_from);
  if (depth === undefined) return undefined;
  const changed = unit.state_changed_at;
  const booked = (b: BookingRef, minutes: number): StepState =>
    live(b) ? { status: "booked", start: b.starts_at, end: b.ends_at } : { status: "unbooked", minutes };

  const print: StepState = depth >= DEPTH.green ? { status: "done", end: endOf(unit.build, changed) } : booked(unit.build, unit.estimates.print);
  const wash: StepState = depth >= DEPTH.brown ? { status: "done", end: endOf(unit.wash, changed) } : booked(unit.wash, unit.estimates.wash);
  let drying: StepState;
  if (depth >= DEPTH.brown) drying = { status: "done", end: changed };
  else if (wash.status === "booked" && timing.drying_minutes > 0) {
    drying = { status: "booked", start: wash.end, end: new Date(wash.end.getTime() + timing.drying_minutes * 60_000) };
  } else drying = { status: "unbooked", minutes: timing.drying_minutes };
  const furnace: StepState = depth >= DEPTH.sintered ? { status: "done", end: endOf(unit.run, changed) } : booked(unit.run, unit.estimates.furnace);
  let finishing: StepState;
  if (depth >= DEPTH.done) finishing = { status: "done", end: changed };
  else if (depth === DEPTH.finishing) {
    const elapsed = (now.getTime() - changed.getTime()) / 60_000;
    finishing = { status: "unbooked", minutes: Math.max(0, timing.finishing_lead_minutes - elapsed) };
  } else finishing = { status: "unbooked", minutes: timing.finishing_lead_minutes };
  return { print, wash, drying, furnace, finishing };
}

export function projectUnitRow(unit: UnitForProjection, dueAt: Date, timing: ShopTiming, now: Date): UnitProjection | undefined {
  const steps = unitSteps(unit, timing, now);
  if (!steps) return undefined;
  return projectUnit({ now, dueAt, steps, atRiskMarginMinutes: timing.at_risk_margin_minutes, staffing: timing.staffing });
}

export type OrderForRisk = {
  id: string;
  code: string;
  customer: string;
  due_at: Date;
  priority: number;
  units: Array<UnitForProjection & { serial: string; id?: string }>;
};

export type OrderRisk = {
  id: string;
  code: string;
  customer: string;
  due_at: string;
  priority: number;
  projected_end: string;
  slack_minutes: number;
  status: ProjectionStatus;
  units_total: number;
  units_done: number;
  units_scrapped: number;
  /** The unit that finishes last, and the step it is at. */
  latest_serial: string;
  latest_unit_id: string | null;
  latest_state: string;
};

/** Projected completion and status of each order that still has units to finish. */
export function orderRisks(orders: OrderForRisk[], timing: ShopTiming, now: Date): OrderRisk[] {
  const out: OrderRisk[] = [];
  for (const order of orders) {
    const live = order.units.filter((u) => u.state !== "scrapped");
    if (!live.length || live.every((u) => u.state === "done")) continue;
    const projections = live.map((u) => projectUnitRow(u, order.due_at, timing, now)!);
    const p = projectOrder(order.due_at, projections, timing.at_risk_margin_minutes);
    const latest = live[p.latestUnitIndex];
    out.push({
      id: order.id,
      code: order.code,
      customer: order.customer,
      due_at: order.due_at.toISOString(),
      priority: order.priority,
      projected_end: p.projectedEnd.toISOString(),
      slack_minutes: p.slackMinutes,
      status: p.status,
      units_total: order.units.length,
      units_done: order.units.filter((u) => u.state === "done").length,
      units_scrapped: order.units.length - live.length,
      latest_serial: latest.serial,
      latest_unit_id: latest.id ?? null,
      latest_state: latest.state,
    });
  }
  const rank: Record<ProjectionStatus, number> = { late: 0, at_risk: 1, on_time: 2 };
  return out.sort((a, b) => rank[a.status] - rank[b.status] || a.slack_minutes - b.slack_minutes);
}

/**
 * The orders that are late now: due date passed while units of them are still unfinished. The same
 * projection as the capacity page (orderRisks: an order is open while a live unit is not done, and
 * "late" when it is projected to finish after its due date), narrowed to the orders whose due date
 * has already gone by, so that a forecast that may still change is not reported as a fact.
 */
export function overdueOrders(orders: OrderForRisk[], timing: ShopTiming, now: Date): OrderRisk[] {
  return orderRisks(orders, timing, now).filter((o) => o.status === "late" && Date.parse(o.due_at) <= now.getTime());
}
