import { ComputationError } from "@/lib/errors";

// Printer plan for the floor's "Propose plan": unscheduled builds onto compatible printers by
// earliest due date (Jackson's rule), each to the printer on which it finishes first, in the
// earliest gap that clears maintenance windows and the bookings already on the floor, starting
// only when someone is on shift. Durations may differ per printer (deposition rates differ).
// Times are UTC milliseconds; durations minutes.

export type PlanPrinter = {
  id: string;
  /** Intervals [start, end) nothing may overlap: maintenance and existing bookings. */
  blocked: Array<[number, number]>;
};

export type PlanBuild = {
  id: string;
  due: number | null;
  /** Minutes on each printer that can take it; printers missing here cannot. */
  minutes: Record<string, number>;
};

export type PlanInput = {
  now: number;
  printers: PlanPrinter[];
  builds: PlanBuild[];
  /** Earliest instant ≥ t at which someone can start a build; identity when absent. */
  nextStart?: (t: number) => number;
  /** Give up on a build that cannot start within this horizon (default 120 days). */
  horizonMs?: number;
};

export type PlanItem = { build_id: string; printer_id: string; start: number; end: number; lateness_min: number };
export type PlanUnplaced = { build_id: string; reason: string };
export type PlanMetrics = {
  builds: number;
  placed: number;
  /** Latest end minus now, minutes. */
  makespan_min: number;
  /** A bound no plan can beat: the longer of the longest single build and the work spread evenly over the printers. */
  makespan_lower_bound_min: number;
  max_lateness_min: number;
  total_lateness_min: number;
  late_count: number;
};
export type PlanResult = { items: PlanItem[]; unplaced: PlanUnplaced[]; metrics: PlanMetrics };

const MIN = 60_000;

/** Earliest start ≥ t of a d-minute job that overlaps nothing in the sorted `blocked` list. */
export function earliestGap(blocked: Array<[number, number]>, t: number, minutes: number, nextStart: (t: number) => number, limit: number): number | null {
  const d = minutes * MIN;
  let start = nextStart(t);
  // blocked is sorted by start; skip what ends before the candidate start.
  let i = 0;
  for (let guard = 0; guard < 100_000; guard++) {
    if (start > limit) return null;
    while (i < blocked.length && blocked[i][1] <= start) i++;
    let moved = false;
    for (let j = i; j < blocked.length && blocked[j][0] < start + d; j++) {
      if (blocked[j][1] > start) {
        start = nextStart(blocked[j][1]);
        moved = true;
        break;
      }
    }
    if (!moved) return start;
  }
  return null;
}

function insertSorted(list: Array<[number, number]>, iv: [number, number]) {
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (list[mid][0] < iv[0]) lo = mid + 1;
    else hi = mid;
  }
  list.splice(lo, 0, iv);
}

export function planPrinters(input: PlanInput): PlanResult {
  const { now } = input;
  if (!Number.isFinite(now)) throw new ComputationError("the plan needs a valid start time", "now");
  const nextStart = input.nextStart ?? ((t: number) => t);
  const limit = now + (input.horizonMs ?? 120 * 86_400_000);
  const lanes = new Map(input.printers.map((p) => [p.id, [...p.blocked].filter(([s, e]) => e > now && e > s).sort((a, b) => a[0] - b[0])]));
  for (const b of input.builds) {
    for (const [pid, m] of Object.entries(b.minutes)) {
      if (!(m > 0) || !Number.isFinite(m)) throw new ComputationError(`build ${b.id}: print time on ${pid} must be positive`, "minutes");
    }
  }
  // Earliest due first; no due date goes last; a longer build first among equals.
  const order = [...input.builds].sort((a, b) => {
    const da = a.due ?? Infinity;
    const db = b.due ?? Infinity;
    if (da !== db) return da - db;
    const ma = Math.min(...Object.values(a.minutes), Infinity);
    const mb = Math.min(...Object.values(b.minutes), Infinity);
    return mb - ma || a.id.localeCompare(b.id);
  });
  const items: PlanItem[] = [];
  const unplaced: PlanUnplaced[] = [];
  for (const b of order) {
    let best: { printer_id: string; start: number; end: number } | null = null;
    const candidates = Object.keys(b.minutes).filter((pid) => lanes.has(pid));
    if (candidates.length === 0) {
      unplaced.push({ build_id: b.id, reason: "no printer can take it (material, plate or build height)" });
      continue;
    }
    for (const pid of candidates) {
      const start = earliestGap(lanes.get(pid)!, now, b.minutes[pid], nextStart, limit);
      if (start === null) continue;
      const end = start + b.minutes[pid] * MIN;
      if (!best || end < best.end || (end === best.end && pid < best.printer_id)) best = { printer_id: pid, start, end };
    }
    if (!best) {
      unplaced.push({ build_id: b.id, reason: "no free slot on a compatible printer within the planning horizon" });
      continue;
    }
    insertSorted(lanes.get(best.printer_id)!, [best.start, best.end]);
    const lateness = b.due === null ? 0 : Math.max(0, (best.end - b.due) / MIN);
    items.push({ build_id: b.id, ...best, lateness_min: lateness });
  }
  const placedBuilds = order.filter((b) => items.some((i) => i.build_id === b.id));
  const shortest = placedBuilds.map((b) => Math.min(...Object.values(b.minutes)));
  const printersUsed = new Set(placedBuilds.flatMap((b) => Object.keys(b.minutes))).size || 1;
  const lowerBound = shortest.length ? Math.max(Math.max(...shortest), shortest.reduce((s, m) => s + m, 0) / printersUsed) : 0;
  const lateness = items.map((i) => i.lateness_min);
  return {
    items: items.sort((a, b) => a.start - b.start || a.printer_id.localeCompare(b.printer_id)),
    unplaced,
    metrics: {
      builds: input.builds.length,
      placed: items.length,
      makespan_min: items.length ? (Math.max(...items.map((i) => i.end)) - now) / MIN : 0,
      makespan_lower_bound_min: lowerBound,
      max_lateness_min: lateness.length ? Math.max(...lateness) : 0,
      total_lateness_min: lateness.reduce((s, l) => s + l, 0),
      late_count: lateness.filter((l) => l > 0).length,
    },
  };
}
