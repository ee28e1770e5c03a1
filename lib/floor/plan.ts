import { ComputationError } from "@/lib/errors";
import { planPrinters } from "@/lib/planning/printer-plan";
import { StaffedCalendar, type StaffedHours } from "@/lib/planning/staffed-hours";
import type { WeeklyPattern } from "@/lib/process/time-zone";

// The floor's "Propose plan" on top of lib/planning/printer-plan (earliest due date list
// scheduling with a local search). The floor knows more than that planner's instance format
// holds, so it is translated:
// - which printers can take a build was decided by the real plate packer and height check
//   (lib/builds/estimate); each distinct set of such printers becomes one compatibility tag,
//   passed as the planner's "material", and sizes are left neutral;
// - print time differs per printer (deposition rates differ) while the planner takes one
//   duration per build, so it plans with the longest, which is always safe, and each printer's
//   sequence is then re-timed with the real duration on that printer. Re-timing in the planned
//   order only ever moves a build earlier, so nothing the planner kept apart can overlap.
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
  /** Builds may only start in these hours; none = any time. */
  staffed?: StaffedHours | null;
  /** Time the planner's lateness search may take, ms (none: until no move helps). */
  budget_ms?: number;
};

export type PlanItem = { build_id: string; printer_id: string; start: number; end: number; lateness_min: number };
export type PlanUnplaced = { build_id: string; reason: string };
export type PlanMetrics = {
  builds: number;
  placed: number;
  /** Latest end minus now, minutes. */
  makespan_min: number;
  /** No plan ends sooner: the longer of the longest build on its fastest printer and the work spread evenly. */
  makespan_lower_bound_min: number;
  max_lateness_min: number;
  total_lateness_min: number;
  late_count: number;
  /** Moves the planner's local search made beyond plain earliest-due-date. */
  search_moves: number;
  /** The search stopped at the time budget (a longer one may do better). */
  search_timed_out: boolean;
};
export type PlanResult = { items: PlanItem[]; unplaced: PlanUnplaced[]; metrics: PlanMetrics };

const MIN = 60_000;
// A build without a due date is planned after every dated one.
const NO_DUE_MS = 10 * 365 * 86_400_000;

/** Earliest start ≥ t of a job of `minutes` that overlaps nothing in `blocked` (sorted by start). */
export function earliestGap(blocked: Array<[number, number]>, t: number, minutes: number, nextStart: (t: number) => number, limit = Infinity): number | null {
  const d = minutes * MIN;
  let start = nextStart(t);
  for (let guard = 0; guard < 100_000; guard++) {
    if (start > limit) return null;
    const hit = blocked.find(([s, e]) => s < start + d && e > start);
    if (!hit) return start;
    start = nextStart(hit[1]);
  }
  return null;
}

/** The shop's weekly shifts in its time zone, or none (then a build may start at any time). */
export function staffedHoursFor(pattern: WeeklyPattern, timeZone: string): StaffedHours | null {
  return pattern.length ? { pattern, timeZone } : null;
}

export function planFloor(input: PlanInput): PlanResult {
  const { now } = input;
  if (!Number.isFinite(now)) throw new ComputationError("the plan needs a valid start time", "now");
  for (const b of input.builds) {
    for (const [pid, m] of Object.entries(b.minutes)) {
      if (!(m > 0) || !Number.isFinite(m)) throw new ComputationError(`build ${b.id}: print time on ${pid} must be positive`, "minutes");
    }
  }
  const printerIds = new Set(input.printers.map((p) => p.id));
  const unplaced: PlanUnplaced[] = [];
  const plannable: Array<PlanBuild & { tag: string }> = [];
  for (const b of input.builds) {
    const takers = Object.keys(b.minutes).filter((p) => printerIds.has(p)).sort();
    if (!takers.length) unplaced.push({ build_id: b.id, reason: "no printer can take it (material, plate or build height)" });
    else plannable.push({ ...b, tag: takers.join("|") });
  }
  const iso = (t: number) => new Date(t).toISOString();
  const result = planPrinters(
    {
      kind: "printer-plan",
      name: "floor",
      now: iso(now),
      printers: input.printers.map((p) => {
        const tags = [...new Set(plannable.filter((b) => b.tag.split("|").includes(p.id)).map((b) => b.tag))];
        return {
          id: p.id,
          materials: tags.length ? tags : ["-"],
          build_volume_mm: [1, 1, 1],
          blocked: p.blocked.filter(([s, e]) => e > now && e > s).map(([s, e]) => ({ start: iso(s), end: iso(e) })),
        };
      }),
      builds: plannable.map((b) => ({
        id: b.id,
        material: b.tag,
        size_mm: [1, 1, 1],
        duration_min: Math.max(...b.tag.split("|").map((p) => b.minutes[p])),
        due: iso(b.due ?? now + NO_DUE_MS),
      })),
    },
    { staffed_hours: input.staffed ?? null, budgetMs: input.budget_ms },
  );
  for (const u of result.unplaced) unplaced.push({ build_id: u.build, reason: u.reason });

  const cal = input.staffed ? new StaffedCalendar(input.staffed, now) : null;
  const nextStart = (t: number) => (cal ? cal.nextStart(t) : t);
  const byId = new Map(plannable.map((b) => [b.id, b]));
  const items: PlanItem[] = [];
  for (const p of input.printers) {
    const blocked = p.blocked.filter(([s, e]) => e > now && e > s).sort((a, b) => a[0] - b[0]);
    const mine = result.assignments.filter((a) => a.printer === p.id).sort((a, b) => Date.parse(a.start) - Date.parse(b.start));
    let cursor = now;
    for (const a of mine) {
      const b = byId.get(a.build)!;
      const minutes = b.minutes[p.id];
      const planned = Date.parse(a.start);
      const start = Math.min(planned, earliestGap(blocked, cursor, minutes, nextStart) ?? planned);
      const end = start + minutes * MIN;
      cursor = end;
      items.push({ build_id: b.id, printer_id: p.id, start, end, lateness_min: b.due === null ? 0 : Math.max(0, (end - b.due) / MIN) });
    }
  }
  items.sort((a, b) => a.start - b.start || a.printer_id.localeCompare(b.printer_id));

  const placed = items.map((i) => byId.get(i.build_id)!);
  const fastest = placed.map((b) => Math.min(...Object.values(b.minutes)));
  const printersUsable = new Set(placed.flatMap((b) => Object.keys(b.minutes).filter((p) => printerIds.has(p)))).size || 1;
  const lateness = items.map((i) => i.lateness_min);
  return {
    items,
    unplaced,
    metrics: {
      builds: input.builds.length,
      placed: items.length,
      makespan_min: items.length ? (Math.max(...items.map((i) => i.end)) - now) / MIN : 0,
      makespan_lower_bound_min: fastest.length ? Math.max(Math.max(...fastest), fastest.reduce((s, m) => s + m, 0) / printersUsable) : 0,
      max_lateness_min: lateness.length ? Math.max(...lateness) : 0,
      total_lateness_min: lateness.reduce((s, l) => s + l, 0),
      late_count: lateness.filter((l) => l > 0).length,
      search_moves: result.moves,
      search_timed_out: result.timed_out,
    },
  };
}
