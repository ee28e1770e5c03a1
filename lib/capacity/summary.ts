import { utilization, type PeriodUtilization } from "@/lib/process/utilization";
import { addLocalDays, formatLocalDate, localDateOf, startOfLocalDay, weekdayOf } from "@/lib/process/time-zone";
import { ComputationError } from "@/lib/errors";
import type { ResourceKind } from "./schemas";

// The manager's capacity figures from plain rows: utilization per resource and kind, the
// booked work still ahead of each resource, work in progress by state and weekly throughput.

const HOUR = 3_600_000;

export type Interval = { start: Date; end: Date };
export type CapacityResource = {
  id: string;
  kind: ResourceKind;
  name: string;
  /** Bookings that occupy the resource (scheduled, running or complete). */
  bookings: Interval[];
  maintenance: Interval[];
};

export type PeriodRow = {
  label: string;
  available_hours: number;
  busy_hours: number;
  maintenance_hours: number;
  utilization: number | null;
};
export type UtilizationRow = { resource_id: string; kind: ResourceKind; name: string; periods: PeriodRow[]; total: PeriodRow };
export type KindUtilizationRow = { kind: ResourceKind; periods: PeriodRow[]; total: PeriodRow };

const toRow = (p: Omit<PeriodUtilization, "label"> & { label?: string }, label = p.label ?? "total"): PeriodRow => ({
  label,
  available_hours: p.availableHours,
  busy_hours: p.busyHours,
  maintenance_hours: p.maintenanceHours,
  utilization: p.utilization,
});

/** A kind's figure is pooled hours (Σ busy / Σ available), not a mean of percentages. */
function pool(rows: PeriodRow[], label: string): PeriodRow {
  const available = rows.reduce((a, r) => a + r.available_hours, 0);
  const busy = rows.reduce((a, r) => a + r.busy_hours, 0);
  const maintenance = rows.reduce((a, r) => a + r.maintenance_hours, 0);
  return { label, available_hours: available, busy_hours: busy, maintenance_hours: maintenance, utilization: available > 0 ? busy / available : null };
}

export function utilizationReport(
  resources: CapacityResource[],
  from: Date,
  to: Date,
  timeZone: string,
  period: "day" | "week",
): { resources: UtilizationRow[]; kinds: KindUtilizationRow[] } {
  const results = utilization({
    from,
    to,
    timeZone,
    period,
    resources: resources.map((r) => ({ id: r.id, bookings: r.bookings, maintenance: r.maintenance })),
  });
  const rows: UtilizationRow[] = results.map((res, i) => ({
    resource_id: res.resourceId,
    kind: resources[i].kind,
    name: resources[i].name,
    periods: res.periods.map((p) => toRow(p)),
    total: toRow(res.total),
  }));
  const kinds: KindUtilizationRow[] = [];
  for (const kind of ["printer", "wash_station", "furnace"] as const) {
    const ofKind = rows.filter((r) => r.kind === kind);
    if (!ofKind.length) continue;
    const labels = ofKind[0].periods.map((p) => p.label);
    kinds.push({
      kind,
      periods: labels.map((label, j) => pool(ofKind.map((r) => r.periods[j]), label)),
      total: pool(ofKind.map((r) => r.total), "total"),
    });
  }
  return { resources: rows, kinds };
}

export type QueueRow = {
  resource_id: string;
  kind: ResourceKind;
  name: string;
  /** Booked hours from now on: the running booking's remainder plus every later booking. */
  hours_ahead: number;
  bookings_ahead: number;
  /** When the last booking ends (null: nothing ahead). */
  booked_until: string | null;
};

/** Work already booked on each resource that is still ahead of `now`. */
export function queueAhead(resources: CapacityResource[], now: Date): QueueRow[] {
  const t = now.getTime();
  return resources.map((r) => {
    let ms = 0;
    let count = 0;
    let until = -Infinity;
    for (const b of r.bookings) {
      const end = b.end.getTime();
      if (end <= t) continue;
      ms += end - Math.max(b.start.getTime(), t);
      count++;
      until = Math.max(until, end);
    }
    return {
      resource_id: r.id,
      kind: r.kind,
      name: r.name,
      hours_ahead: ms / HOUR,
      bookings_ahead: count,
      booked_until: Number.isFinite(until) ? new Date(until).toISOString() : null,
    };
  });
}

export const WIP_STATES = [
  "planned", "printing", "green", "washing", "brown", "sintering", "sintered", "ready_for_finishing", "finishing", "on_hold",
] as const;
export type WipState = (typeof WIP_STATES)[number];

/** Units in progress per state, every state listed (zero included) in the order work flows. */
export function wipByState(units: Array<{ state: string }>): Array<{ state: WipState; count: number }> {
  const counts = new Map<string, number>();
  for (const u of units) counts.set(u.state, (counts.get(u.state) ?? 0) + 1);
  return WIP_STATES.map((state) => ({ state, count: counts.get(state) ?? 0 }));
}

export type ThroughputRow = { week: string; start: string; end: string; done: number; sintered: number };

/**
 * Units finished (reached done) and sintered per local week (weeks start on Monday, ISO 8601),
 * counted from their state events inside [from, to).
 */
export function weeklyThroughput(
  events: Array<{ at: Date; to_state: string }>,
  from: Date,
  to: Date,
  timeZone: string,
): ThroughputRow[] {
  if (!(from.getTime() < to.getTime())) throw new ComputationError("the range must end after it starts", "to");
  let date = localDateOf(from.getTime(), timeZone);
  date = addLocalDays(date, -((weekdayOf(date) - 1 + 7) % 7));
  const weeks: ThroughputRow[] = [];
  const bounds: Array<[number, number]> = [];
  for (;;) {
    const start = startOfLocalDay(date, timeZone);
    if (start >= to.getTime()) break;
    const next = addLocalDays(date, 7);
    const end = startOfLocalDay(next, timeZone);
    const s = Math.max(start, from.getTime());
    const e = Math.min(end, to.getTime());
    weeks.push({ week: formatLocalDate(date), start: new Date(s).toISOString(), end: new Date(e).toISOString(), done: 0, sintered: 0 });
    bounds.push([s, e]);
    date = next;
  }
  for (const ev of events) {
    const t = ev.at.getTime();
    const i = bounds.findIndex(([s, e]) => t >= s && t < e);
    if (i < 0) continue;
    if (ev.to_state === "done") weeks[i].done++;
    else if (ev.to_state === "sintered") weeks[i].sintered++;
  }
  return weeks;
}

/** Instants bounding a range of local dates, both days included. */
export function rangeInstants(fromDate: string, toDate: string, timeZone: string): { from: Date; to: Date } {
  const parse = (s: string) => ({ year: Number(s.slice(0, 4)), month: Number(s.slice(5, 7)), day: Number(s.slice(8, 10)) });
  const from = startOfLocalDay(parse(fromDate), timeZone);
  const to = startOfLocalDay(addLocalDays(parse(toDate), 1), timeZone);
  return { from: new Date(from), to: new Date(to) };
}

/** Today's local date in the shop and a default range around it: two weeks back, two ahead. */
export function defaultRange(now: Date, timeZone: string): { from: string; to: string } {
  const today = localDateOf(now.getTime(), timeZone);
  return { from: formatLocalDate(addLocalDays(today, -13)), to: formatLocalDate(addLocalDays(today, 14)) };
}
