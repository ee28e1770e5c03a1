// Furnace-run proposals: brown (and soon-brown) units grouped into runs by the tray packer, one
// sinter profile per run, urgent first (urgency = when a unit's run should start, see below), then
// each run booked on a furnace that can hold its layout at the earliest time when all its units are brown, the furnace is free (existing bookings and runs
// proposed before it) and, when the shop sets staffed hours, someone is there to load it.
// Runs are booked in order of their most urgent unit. A proposal is only a proposal: nothing is
// written until a person accepts it.

import { ComputationError } from "@/lib/errors";
import { GEOMETRY_EPS } from "@/lib/packing/rectangles";
import { packTraysReported, searchWorkFor, type PackSearchReport } from "@/lib/packing/trays";
import type { PackFurnace, PackUnit, TrayLowerBound, TrayRun, Unplaced } from "@/lib/packing/types";
import { StaffedCalendar, type StaffedHours } from "./staffed-hours";

const MINUTE_MS = 60_000;

export interface FurnacePlanUnit extends PackUnit {
  /** When the unit is (or is expected to be) brown; absent or null: brown now. */
  ready_at?: string | null;
}

export interface FurnaceBooking {
  furnace: string;
  start: string;
  end: string;
}

export interface FurnacePlanInput {
  now: string;
  clearance_mm: number;
  furnaces: readonly PackFurnace[];
  units: readonly FurnacePlanUnit[];
  /** Cycle length per sinter profile, minutes (from the profile's segments). */
  cycle_min: Readonly<Record<string, number>>;
  /** Runs already booked and maintenance, per furnace. */
  bookings?: readonly FurnaceBooking[];
  staffed_hours?: StaffedHours | null;
  /**
   * Time the packer's run-removing search may take, ms: the search gets the work our machine does
   * in that time (searchWorkFor, repeatable for a seed), and the budget is also a hard deadline.
   */
  search_budget_ms?: number;
  /** Clock for the deadline (default Date.now). */
  clock?: () => number;
}

export interface ProposedRun extends TrayRun {
  start: string;
  end: string;
  /** The latest ready time among its units (the run cannot start before). */
  ready_at: string;
}

export interface FurnacePlanMetrics {
  run_count: number;
  /** Lower bound on the run count from the tray packer. */
  lower_bound: number;
  /** max(run end − unit due) in minutes; null when nothing is planned. */
  max_lateness_min: number | null;
  late_count: number;
  /** Minutes from `now` to the end of the last proposed run. */
  makespan_min: number;
  /** How the packer's search ended: "bound" = the run count meets the lower bound. */
  search: PackSearchReport & { budget_ms: number | null };
}

export interface FurnacePlanResult {
  runs: ProposedRun[];
  unplaced: Unplaced[];
  lowerBound: TrayLowerBound;
  metrics: FurnacePlanMetrics;
}

function parseTime(s: string, field: string): number {
  const t = Date.parse(s);
  if (Number.isNaN(t)) throw new ComputationError(`${field} is not a readable time: "${s}"`, field);
  return t;
}

/** Can the layout of `run` (made for furnace `from`) go on furnace `to` unchanged? */
function layoutFits(run: TrayRun, from: PackFurnace, to: PackFurnace): boolean {
  if (from.id === to.id) return true;
  const usedTrays = run.trays.filter((t) => t.placements.length > 0).length;
  return (
    to.profiles.includes(run.profile) &&
    to.tray_count >= usedTrays &&
    to.tray_mm[0] >= from.tray_mm[0] - GEOMETRY_EPS &&
    to.tray_mm[1] >= from.tray_mm[1] - GEOMETRY_EPS &&
    to.usable_height_mm >= run.tallest_mm - GEOMETRY_EPS &&
    to.max_load_g >= run.mass_g
  );
}

/** Earliest start ≥ t of a [start, start+len) window clear of `busy` (sorted, disjoint). */
function earliestGap(busy: readonly [number, number][], t: number, len: number, cal: StaffedCalendar | null): number {
  let s = cal ? cal.nextStart(t) : t;
  for (;;) {
    const clash = busy.find(([bs, be]) => bs < s + len && be > s);
    if (!clash) return s;
    s = cal ? cal.nextStart(clash[1]) : clash[1];
  }
}

function insertBusy(busy: [number, number][], w: [number, number]): void {
  let k = 0;
  while (k < busy.length && busy[k][0] < w[0]) k++;
  busy.splice(k, 0, w);
}

export function planFurnaceRuns(input: FurnacePlanInput): FurnacePlanResult {
  const now = parseTime(input.now, "now");
  const byFurnace = new Map(input.furnaces.map((f) => [f.id, f]));
  const busy = new Map<string, [number, number][]>(input.furnaces.map((f) => [f.id, []]));
  for (const b of input.bookings ?? []) {
    const list = busy.get(b.furnace);
    if (!list) throw new ComputationError(`booking on unknown furnace ${b.furnace}`, "bookings");
    const s = parseTime(b.start, "booking start");
    const e = parseTime(b.end, "booking end");
    if (!(e > s)) throw new ComputationError(`booking on ${b.furnace} ends before it starts`, "bookings");
    insertBusy(list, [s, e]);
  }
  for (const [profile, m] of Object.entries(input.cycle_min)) {
    if (!(m > 0) || !Number.isFinite(m)) {
      throw new ComputationError(`cycle time for ${profile} must be a positive number of minutes`, "cycle_min");
    }
  }
  const unplaced: Unplaced[] = [];
  const packable = input.units.filter((u) => {
    if (input.cycle_min[u.profile] === undefined) {
      unplaced.push({ unit: u.id, code: "no_profile", reason: `no cycle time is known for profile ${u.profile}` });
      return false;
    }
    return true;
  });
  const ready = new Map(
    packable.map((u) => [u.id, Math.max(now, u.ready_at ? parseTime(u.ready_at, `unit ${u.id} ready_at`) : now)]),
  );
  const due = new Map(packable.map((u) => [u.id, u.due ? parseTime(u.due, `unit ${u.id} due`) : Infinity]));
  // The packer groups by urgency. Rank each unit by when its run should start: not before it is
  // brown, and no later than its due date minus the cycle. So a soon-brown unit joins units that
  // can wait until it is ready, instead of holding back units that are needed now.
  const packUnits = packable.map((u) => {
    const d = due.get(u.id)!;
    if (!Number.isFinite(d)) return u;
    const key = Math.max(ready.get(u.id)!, d - input.cycle_min[u.profile] * MINUTE_MS);
    return { ...u, due: new Date(key).toISOString() };
  });
  const budget = input.search_budget_ms ?? null;
  const { result: packed, search } = packTraysReported(
    { clearance_mm: input.clearance_mm, furnaces: input.furnaces, units: packUnits },
    budget === null
      ? { clock: input.clock }
      : // About the work our machine does in the budget (searchWorkFor), so a plan is the same for
        // the same queue wherever the machine keeps up; the deadline caps it where it does not. The
        // app runs this on a compute thread (db/compute/threads.ts), not on the request's thread.
        { search: { work: searchWorkFor(packUnits.length, budget), deadlineMs: budget }, clock: input.clock },
  );
  unplaced.push(...packed.unplaced);
  const cal = input.staffed_hours ? new StaffedCalendar(input.staffed_hours, now) : null;

  const runs: ProposedRun[] = [];
  let maxLate = Number.NEGATIVE_INFINITY;
  let lateCount = 0;
  let last = now;
  // The packer returns runs most urgent first; book them in that order.
  for (const run of packed.runs) {
    const ids = run.trays.flatMap((t) => t.placements.map((p) => p.unit));
    const readyAt = Math.max(...ids.map((id) => ready.get(id)!));
    const len = input.cycle_min[run.profile] * MINUTE_MS;
    const home = byFurnace.get(run.furnace)!;
    let best: { f: PackFurnace; start: number } | null = null;
    for (const f of input.furnaces) {
      if (!layoutFits(run, home, f)) continue;
      const start = earliestGap(busy.get(f.id)!, readyAt, len, cal);
      if (!best || start < best.start || (start === best.start && f.id === home.id)) best = { f, start };
    }
    const chosen = best!;
    insertBusy(busy.get(chosen.f.id)!, [chosen.start, chosen.start + len]);
    const end = chosen.start + len;
    last = Math.max(last, end);
    for (const id of ids) {
      const l = end - due.get(id)!;
      if (l > maxLate) maxLate = l;
      if (l > 0) lateCount++;
    }
    const trays =
      chosen.f.id === home.id
        ? run.trays
        : Array.from({ length: chosen.f.tray_count }, (_, index) => ({
            index,
            placements: run.trays[index]?.placements ?? [],
          }));
    const footprint = trays.reduce((s, t) => s + t.placements.reduce((a, p) => a + p.w * p.d, 0), 0);
    runs.push({
      ...run,
      furnace: chosen.f.id,
      trays,
      area_used_fraction: footprint / (chosen.f.tray_count * chosen.f.tray_mm[0] * chosen.f.tray_mm[1]),
      start: new Date(chosen.start).toISOString(),
      end: new Date(end).toISOString(),
      ready_at: new Date(readyAt).toISOString(),
    });
  }
  return {
    runs,
    unplaced,
    lowerBound: packed.lowerBound,
    metrics: {
      run_count: runs.length,
      lower_bound: packed.lowerBound.largest,
      max_lateness_min: Number.isFinite(maxLate) ? maxLate / MINUTE_MS : null,
      late_count: lateCount,
      makespan_min: (last - now) / MINUTE_MS,
      search: { ...search, budget_ms: budget },
    },
  };
}
