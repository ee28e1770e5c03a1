// "Suggest batches": wash batches for the green units and furnace runs for the brown and
// soon-brown ones, with start times on the lanes. A proposal only; nothing is booked until a
// person accepts it.
//
// Furnace runs come from the furnace planner (lib/planning/furnace-plan: the tray packer, fewest
// runs with one sinter profile each and urgent units first, its lower bound, and for each run the
// earliest staffed start on a furnace that holds its layout once its units are brown).
// Wash batches group units of similar wash time (a batch lasts as long as its slowest unit, so
// mixing a 6 mm wall with 2 mm walls makes the thin parts wait): units go longest wash first into
// the first batch that takes them (first-fit decreasing), and batches are booked most urgent first.

import type { TrayRun } from "@/lib/packing/types";
import { planFurnaceRuns } from "@/lib/planning/furnace-plan";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import { checkWashAdd, packFurnace, packUnit, profileLabel, washMinutesOf } from "./rules";
import { nextStaffed, type Staffing } from "./staffed";
import type { BoardFurnace, BoardProfile, BoardStation, BoardUnit } from "./types";

const MIN = 60_000;

export interface Busy {
  resource_id: string;
  start: number;
  end: number;
}

export interface SuggestInput {
  now: Date;
  staffing: Staffing;
  clearance_mm: number;
  drying_minutes: number;
  finishing_lead_minutes: number;
  furnaces: readonly BoardFurnace[];
  stations: readonly BoardStation[];
  profiles: readonly BoardProfile[];
  wash_units: readonly BoardUnit[];
  furnace_units: readonly BoardUnit[];
  /** Bookings and maintenance already on the lanes. */
  busy: readonly Busy[];
  wash: boolean;
  furnace: boolean;
  /** Packer restarts per profile (more is slower and rarely better). */
  restarts?: number;
  /** Time the packer's search may take, ms (see planFurnaceRuns). */
  search_budget_ms?: number;
}

export interface ProposedRun {
  key: string;
  furnace_id: string;
  profile_id: string;
  starts_at: string;
  ends_at: string;
  cycle_minutes: number;
  tray_layout: TrayRun;
  units: { id: string; version: number; serial: string }[];
  mass_g: number;
  area_used_fraction: number;
  /** Latest projected finish (after finishing lead) minus due, minutes; negative = early. */
  max_lateness_min: number;
}

export interface ProposedWash {
  key: string;
  wash_station_id: string;
  starts_at: string;
  ends_at: string;
  est_minutes: number;
  units: { id: string; version: number; serial: string }[];
  mass_g: number;
}

export interface Unplaced {
  unit_id: string;
  serial: string;
  kind: "wash" | "furnace";
  reason: string;
}

export interface SuggestMetrics {
  furnace_units: number;
  furnace_runs: number;
  /** The packer's lower bound on the run count (summed over profiles). */
  lower_bound: number;
  /** Runs over lower bound; 1 when nothing was to be packed. */
  ratio: number;
  wash_units: number;
  wash_batches: number;
  max_lateness_min: number | null;
  late_units: number;
  pack_ms: number;
  /** The packer's search: budget given, time taken, and why it stopped ("bound": nothing left to gain). */
  search: { budget_ms: number | null; ms: number; stop: "bound" | "budget" | "time" | "off"; start_runs: number };
}

export interface SuggestResult {
  wash: ProposedWash[];
  furnace: ProposedRun[];
  unplaced: Unplaced[];
  metrics: SuggestMetrics;
}

/** Earliest start ≥ t on the resource, inside staffed hours, clear of every busy interval. */
export function earliestSlot(resource: string, t: number, minutes: number, busy: readonly Busy[], staffing: Staffing): number {
  const mine = busy.filter((b) => b.resource_id === resource).sort((a, b) => a.start - b.start);
  let start = t;
  for (let guard = 0; guard < 10_000; guard++) {
    start = nextStaffed(new Date(start), staffing).getTime();
    const end = start + minutes * MIN;
    const clash = mine.find((b) => b.start < end && start < b.end);
    if (!clash) return start;
    start = clash.end;
  }
  throw new Error(`no free slot found on ${resource}`);
}

function suggestFurnace(input: SuggestInput, unplaced: Unplaced[], busy: Busy[]) {
  const t0 = performance.now();
  const byLabel = new Map(input.profiles.map((p) => [profileLabel(p), p]));
  const furnaceByName = new Map(input.furnaces.map((f) => [f.name, f]));
  const units = new Map(input.furnace_units.map((u) => [u.id, u]));
  const planUnits = [];
  for (const u of input.furnace_units) {
    const profile = input.profiles.find((p) => p.id === u.profile_id);
    if (!profile) {
      unplaced.push({ unit_id: u.id, serial: u.serial, kind: "furnace", reason: `${u.material_code} has no default sinter profile` });
      continue;
    }
    planUnits.push({ ...packUnit(u, profile, input.profiles), ready_at: u.ready_at });
  }
  // The planner takes one cycle per profile; the longest over the furnaces that run it keeps
  // every proposed slot long enough whichever furnace the run lands on.
  const cycle = (p: BoardProfile, f?: BoardFurnace) => Math.ceil(furnaceCycle(profileForCycleOf(p), f ? { maxCoolRateCPerMin: f.max_cool_rate_c_per_min } : undefined).totalMinutes);
  const cycleMin: Record<string, number> = {};
  for (const p of input.profiles) {
    const takers = input.furnaces.filter((f) => f.profile_ids.includes(p.id));
    if (takers.length) cycleMin[profileLabel(p)] = Math.max(...takers.map((f) => cycle(p, f)));
  }
  const byId = new Map(input.furnaces.map((f) => [f.id, f]));
  const plan = planFurnaceRuns({
    now: input.now.toISOString(),
    clearance_mm: input.clearance_mm,
    furnaces: input.furnaces.map((f) => packFurnace(f, input.profiles)),
    units: planUnits,
    cycle_min: cycleMin,
    bookings: busy.filter((b) => byId.has(b.resource_id)).map((b) => ({ furnace: byId.get(b.resource_id)!.name, start: new Date(b.start).toISOString(), end: new Date(b.end).toISOString() })),
    staffed_hours: input.staffing,
    search_budget_ms: input.search_budget_ms,
  });
  const packMs = performance.now() - t0;
  for (const u of plan.unplaced) {
    const unit = units.get(u.unit)!;
    unplaced.push({ unit_id: u.unit, serial: unit.serial, kind: "furnace", reason: u.reason });
  }
  const runs: ProposedRun[] = plan.runs.map((run, i) => {
    const furnace = furnaceByName.get(run.furnace)!;
    const profile = byLabel.get(run.profile)!;
    const minutes = cycle(profile, furnace);
    const start = Date.parse(run.start);
    const end = start + minutes * MIN;
    busy.push({ resource_id: furnace.id, start, end });
    const members = run.trays.flatMap((t) => t.placements.map((p) => units.get(p.unit)!));
    const out = nextStaffed(new Date(end), input.staffing).getTime() + input.finishing_lead_minutes * MIN;
    const lateness = Math.max(...members.map((u) => (out - Date.parse(u.due_at)) / MIN));
    const { start: _s, end: _e, ready_at: _r, ...layout } = run;
    void _s, void _e, void _r;
    return {
      key: `run-${i + 1}`,
      furnace_id: furnace.id,
      profile_id: profile.id,
      starts_at: new Date(start).toISOString(),
      ends_at: new Date(end).toISOString(),
      cycle_minutes: minutes,
      tray_layout: layout,
      units: members.map((u) => ({ id: u.id, version: u.version, serial: u.serial })),
      mass_g: run.mass_g,
      area_used_fraction: run.area_used_fraction,
      max_lateness_min: Math.round(lateness),
    };
  });
  const s = plan.metrics.search;
  const search = { budget_ms: s.budget_ms, ms: Math.round(s.ms), stop: s.stop, start_runs: s.start_runs };
  return { runs, lowerBound: plan.metrics.lower_bound, packMs, placedUnits: planUnits.length - plan.unplaced.length, search };
}

const profileForCycleOf = (p: BoardProfile) => ({
  startTempC: p.start_temp_c,
  segments: p.segments.map((s) => ({ rateCPerMin: s.rate_c_per_min, setpointC: s.setpoint_c, holdMin: s.hold_min })),
  coolRateCPerMin: p.cool_rate_c_per_min,
  coolToC: p.cool_to_c,
});

function suggestWash(input: SuggestInput, unplaced: Unplaced[], busy: Busy[]) {
  type Open = { station: BoardStation; units: BoardUnit[] };
  const open: Open[] = [];
  const assigned = new Map<string, number>(input.stations.map((s) => [s.id, 0]));
  const sorted = [...input.wash_units].sort((a, b) => b.wash_minutes - a.wash_minutes || a.slack_minutes - b.slack_minutes);
  for (const u of sorted) {
    const home = open.find((b) => checkWashAdd({ state: "draft", code: "new" }, b.units, u, b.station).ok);
    if (home) {
      home.units.push(u);
      continue;
    }
    const fitting = input.stations.filter((s) => checkWashAdd({ state: "draft", code: "new" }, [], u, s).ok);
    if (!fitting.length) {
      const reasons = input.stations.map((s) => checkWashAdd({ state: "draft", code: "new" }, [], u, s)).flatMap((r) => (r.ok ? [] : [r.reason]));
      unplaced.push({ unit_id: u.id, serial: u.serial, kind: "wash", reason: reasons[0] ?? "no wash station is in use" });
      continue;
    }
    // The station with the least wash time already handed out gets the new batch.
    const station = fitting.reduce((best, s) => (assigned.get(s.id)! < assigned.get(best.id)! ? s : best));
    assigned.set(station.id, assigned.get(station.id)! + u.wash_minutes);
    open.push({ station, units: [u] });
  }
  const now = input.now.getTime();
  const byUrgency = open
    .map((b) => ({ ...b, minutes: Math.ceil(washMinutesOf(b.units)!), urgency: Math.min(...b.units.map((u) => u.slack_minutes)) }))
    .sort((a, b) => a.urgency - b.urgency);
  return byUrgency.map((b, i): ProposedWash => {
    const start = earliestSlot(b.station.id, now, b.minutes, busy, input.staffing);
    const end = start + b.minutes * MIN;
    busy.push({ resource_id: b.station.id, start, end });
    return {
      key: `wash-${i + 1}`,
      wash_station_id: b.station.id,
      starts_at: new Date(start).toISOString(),
      ends_at: new Date(end).toISOString(),
      est_minutes: b.minutes,
      units: b.units.map((u) => ({ id: u.id, version: u.version, serial: u.serial })),
      mass_g: b.units.reduce((s, u) => s + u.mass_g, 0),
    };
  });
}

export function suggestBatches(input: SuggestInput): SuggestResult {
  const unplaced: Unplaced[] = [];
  const busy: Busy[] = [...input.busy];
  const wash = input.wash ? suggestWash(input, unplaced, busy) : [];
  const f = input.furnace
    ? suggestFurnace(input, unplaced, busy)
    : { runs: [], lowerBound: 0, packMs: 0, placedUnits: 0, search: { budget_ms: input.search_budget_ms ?? null, ms: 0, stop: "off" as const, start_runs: 0 } };
  const lateness = f.runs.map((r) => r.max_lateness_min);
  const due = new Map(input.furnace_units.map((u) => [u.id, Date.parse(u.due_at)]));
  const late = f.runs.reduce((n, r) => {
    const out = nextStaffed(new Date(r.ends_at), input.staffing).getTime() + input.finishing_lead_minutes * MIN;
    return n + r.units.filter((u) => out > due.get(u.id)!).length;
  }, 0);
  return {
    wash,
    furnace: f.runs,
    unplaced,
    metrics: {
      furnace_units: f.placedUnits,
      furnace_runs: f.runs.length,
      lower_bound: f.lowerBound,
      ratio: f.lowerBound > 0 ? f.runs.length / f.lowerBound : 1,
      wash_units: wash.reduce((s, b) => s + b.units.length, 0),
      wash_batches: wash.length,
      max_lateness_min: lateness.length ? Math.max(...lateness) : null,
      late_units: late,
      pack_ms: Math.round(f.packMs),
      search: f.search,
    },
  };
}
