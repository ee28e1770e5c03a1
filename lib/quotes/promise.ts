// Capable-to-promise for one quote line: plan it tentatively into the live schedule, booking
// nothing, and say when it could be finished. The line travels as one lot:
//   print  – plates of equal unit counts, each on the compatible printer where it ends first
//            (earliest gap among that printer's bookings and maintenance, started in staffed
//            hours; print time from lib/builds/estimate, the same estimate a booking uses);
//   wash   – after the last plate, in batches of at most a station's capacity, each on the
//            station where it ends first, loaded in staffed hours; then the drying time;
//   furnace – units join scheduled open runs of their profile that start after the lot is dry
//            and end no later than a new run would (lib/packing canAddToRun), the rest go into
//            new runs packed with packTrays, each on the furnace where it ends first; unloaded in
//            staffed hours;
//   finishing – released when unloaded; the machinists work their queue first come,
//            first served in staffed hours: every unit already released before this lot (units
//            waiting or being finished, units in booked furnace runs that end earlier) is
//            finished first, then this lot's units, a machinist on each unit. The shop's
//            "finishing lead time" (sintered to done, for the projections that do not plan the
//            machinists) is not added here: the queue and the work are that span, counted once.
// Every step ends at the earliest time its resources allow, so adding bookings or queued
// finishing work can only move a step later (the monotonicity the tests check).

import { ComputationError } from "@/lib/errors";
import { judgePrinter, type BuildUnitSpec, type PrinterSpec } from "@/lib/builds/estimate";
import { earliestGap } from "@/lib/floor/plan";
import { canAddToRun, packTrays, type PackFurnace, type PackUnit, type TrayRun } from "@/lib/packing/trays";
import { StaffedCalendar, type StaffedHours } from "@/lib/planning/staffed-hours";

const MIN = 60_000;

export type Interval = [number, number];

export type PromisePrinter = PrinterSpec & { busy: Interval[] };
export type PromiseWashStation = { id: string; name: string; capacity_units: number; basket_mm: [number, number, number]; busy: Interval[] };
export type PromiseFurnace = {
  spec: PackFurnace;
  name: string;
  busy: Interval[];
  /** Cycle minutes on this furnace per profile it runs (its cool-down limit can lengthen a cycle). */
  cycles: Record<string, number | null>;
};
export type PromiseOpenRun = {
  id: string;
  code: string;
  furnace_id: string;
  profile_id: string;
  starts_at: number;
  ends_at: number;
  layout: TrayRun;
  units: PackUnit[];
};

export type SpreadKind = "print" | "wash" | "furnace" | "finishing";

/** Finishing work already on its way to the machinists: released at `release`, machinist-minutes. */
export type FinishingJob = { release: number; minutes: number };
export type Spread = { p90_ratio: number; samples: number; source: "history" | "fallback" };

/** The shop as a promise sees it: equipment, open work, staffed hours and the spreads of history. */
export type PromiseShop = {
  now: number;
  horizon_days: number;
  staffed: StaffedHours | null;
  printers: PromisePrinter[];
  plate_clearance_mm: number;
  wash_stations: PromiseWashStation[];
  drying_minutes: number;
  furnaces: PromiseFurnace[];
  open_runs: PromiseOpenRun[];
  tray_clearance_mm: number;
  /** Machinists who finish in parallel during staffed hours (at least 1 is assumed). */
  finishing_lanes: number;
  /** Finishing work released to the machinists or on its way from booked furnace runs. */
  finishing_queue: FinishingJob[];
  spread: Record<SpreadKind, Spread>;
};

export type PromiseInput = PromiseShop & {
  /** Units to start (after the yield allowance) and units to finish (the requested good ones). */
  start_quantity: number;
  finish_quantity: number;
  unit: {
    material_id: string;
    profile_id: string | null;
    green_mm: { x: number; y: number; z: number };
    green_volume_mm3: number;
    mass_g: number;
    wash_minutes: number;
    finishing_minutes: number;
  };
  /** The plates are already booked and end at this instant: plan the rest of the chain from it. */
  printed_at?: number;
};

export type PromiseStep = {
  kind: "print" | "wash" | "drying" | "furnace" | "finishing";
  label: string;
  resource_id: string | null;
  resource_name: string | null;
  units: number;
  start: string;
  end: string;
  /** How long this step may slip before the next step of the lot has to wait (minutes). */
  slack_min: number;
  critical: boolean;
  /** A furnace step that joins an open run names it. */
  joins_run: string | null;
  minutes: number;
};

export type PlannedPlate = { printer_id: string; units: number; start: string; end: string; minutes: number };

export type PromiseResult =
  | {
      feasible: true;
      completion: string;
      p90: string;
      p90_basis: Record<SpreadKind, Spread>;
      steps: PromiseStep[];
      plates: PlannedPlate[];
      critical_path: string[];
      /** This lot's finishing as a queue job, for the next line of the same quote to plan behind. */
      finishing: FinishingJob & { queued_ahead_min: number; wait_min: number; lanes: number };
    }
  | { feasible: false; reason: string; step: PromiseStep["kind"] };

class Infeasible extends Error {
  constructor(
    readonly step: PromiseStep["kind"],
    message: string,
  ) {
    super(message);
  }
}

function insertSorted(list: Interval[], iv: Interval) {
  let i = list.length;
  while (i > 0 && list[i - 1][0] > iv[0]) i--;
  list.splice(i, 0, iv);
}

/** Largest number of these units one plate of `printer` holds (0 when not even one). */
function plateCapacity(spec: BuildUnitSpec, printer: PrinterSpec, clearance: number, upTo: number, cache: Map<string, number | null>): number {
  const minutes = (k: number) => printMinutes(spec, printer, clearance, k, cache);
  if (minutes(1) === null) return 0;
  let lo = 1;
  let hi = 1;
  while (hi < upTo && minutes(Math.min(upTo, hi * 2)) !== null) hi = Math.min(upTo, hi * 2);
  if (hi >= upTo) return upTo;
  lo = hi;
  hi = Math.min(upTo, hi * 2);
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (minutes(mid) !== null) lo = mid;
    else hi = mid;
  }
  return lo;
}

// Laying out a plate is the costly part of a plan and its answer depends only on these numbers,
// so it is remembered across plans (a quote page, the reverse search and the bench repeat them).
const plateMemo = new Map<string, number | null>();
const PLATE_MEMO_MAX = 5000;

function printMinutes(spec: BuildUnitSpec, printer: PrinterSpec, clearance: number, k: number, cache: Map<string, number | null>): number | null {
  const key = `${printer.id}:${k}`;
  if (cache.has(key)) return cache.get(key)!;
  const takes = printer.active && printer.material_ids.includes(spec.material_id);
  const memoKey = [
    takes, printer.build_x_mm, printer.build_y_mm, printer.build_z_mm, printer.deposition_cm3_per_h, printer.layer_height_mm, printer.layer_overhead_s,
    spec.green_x_mm, spec.green_y_mm, spec.green_z_mm, spec.green_volume_mm3, clearance, k,
  ].join("|");
  let m = plateMemo.get(memoKey);
  if (m === undefined) {
    const units = Array.from({ length: k }, (_, i) => ({ ...spec, unit_id: `u${i}`, serial: `u${i}` }));
    const v = judgePrinter(units, spec.material_id, printer, clearance);
    m = v.ok ? v.est_minutes : null;
    if (plateMemo.size >= PLATE_MEMO_MAX) plateMemo.clear();
    plateMemo.set(memoKey, m);
  }
  cache.set(key, m);
  return m;
}

const fitsBasket = (g: { x: number; y: number; z: number }, basket: [number, number, number]) => {
  const a = [g.x, g.y, g.z].sort((p, q) => p - q);
  const b = [...basket].sort((p, q) => p - q);
  return a.every((v, i) => v <= b[i]);
};

const iso = (t: number) => new Date(t).toISOString();

export function planPromise(input: PromiseInput): PromiseResult {
  try {
    return plan(input);
  } catch (err) {
    if (err instanceof Infeasible) return { feasible: false, reason: err.message, step: err.step };
    throw err;
  }
}

function plan(input: PromiseInput): PromiseResult {
  const { now, unit } = input;
  if (!(input.start_quantity >= 1) || input.finish_quantity > input.start_quantity) {
    throw new ComputationError("a promise needs at least one unit to start and no more to finish than to start", "quantity");
  }
  const limit = now + input.horizon_days * 1440 * MIN;
  const cal = input.staffed ? new StaffedCalendar(input.staffed, now) : null;
  const nextStart = (t: number) => (cal ? cal.nextStart(t) : t);
  const horizonText = `within the ${input.horizon_days}-day planning horizon`;
  const steps: PromiseStep[] = [];

  // Print ----------------------------------------------------------------------------------
  const spec: BuildUnitSpec = {
    unit_id: "u", serial: "u", material_id: unit.material_id,
    green_x_mm: unit.green_mm.x, green_y_mm: unit.green_mm.y, green_z_mm: unit.green_mm.z, green_volume_mm3: unit.green_volume_mm3,
  };
  const cache = new Map<string, number | null>();
  const q = input.start_quantity;
  const planned: PlannedPlate[] = [];
  const printDone = input.printed_at ?? planPrint();
  function planPrint(): number {
  const caps = input.printers.map((p) => plateCapacity(spec, p, input.plate_clearance_mm, q, cache));
  const maxCap = Math.max(0, ...caps);
  if (maxCap === 0) throw new Infeasible("print", "No printer can print this part: material, plate size or build height.");
  const plates = Math.ceil(q / maxCap);
  const sizes = Array.from({ length: plates }, (_, i) => Math.floor(q / plates) + (i < q % plates ? 1 : 0));
  const busyP = input.printers.map((p) => [...p.busy].sort((a, b) => a[0] - b[0]));
  for (const size of sizes) {
    let best: { i: number; start: number; end: number; minutes: number } | null = null;
    input.printers.forEach((p, i) => {
      if (caps[i] < size) return;
      const minutes = printMinutes(spec, p, input.plate_clearance_mm, size, cache)!;
      const start = earliestGap(busyP[i], now, minutes, nextStart, limit);
      if (start === null) return;
      const end = start + minutes * MIN;
      if (!best || end < best.end || (end === best.end && p.id < input.printers[best.i].id)) best = { i, start, end, minutes };
    });
    if (!best) throw new Infeasible("print", `No printer has room for a plate of ${size} ${horizonText}.`);
    const b = best as { i: number; start: number; end: number; minutes: number };
    insertSorted(busyP[b.i], [b.start, b.end]);
    const p = input.printers[b.i];
    planned.push({ printer_id: p.id, units: size, start: iso(b.start), end: iso(b.end), minutes: b.minutes });
    steps.push({ kind: "print", label: `Print ${size} on ${p.name}`, resource_id: p.id, resource_name: p.name, units: size, start: iso(b.start), end: iso(b.end), slack_min: 0, critical: false, joins_run: null, minutes: b.minutes });
  }
  return Math.max(...planned.map((p) => Date.parse(p.end)));
  }

  // Wash -----------------------------------------------------------------------------------
  const stations = input.wash_stations.filter((s) => s.capacity_units > 0 && fitsBasket(unit.green_mm, s.basket_mm));
  if (!stations.length) throw new Infeasible("wash", "No wash station's basket takes this part.");
  const busyW = stations.map((s) => [...s.busy].sort((a, b) => a[0] - b[0]));
  const washMin = Math.ceil(unit.wash_minutes);
  let left = q;
  const washSteps: PromiseStep[] = [];
  while (left > 0) {
    let best: { i: number; start: number; end: number } | null = null;
    stations.forEach((s, i) => {
      const start = earliestGap(busyW[i], printDone, washMin, nextStart, limit);
      if (start === null) return;
      const end = start + washMin * MIN;
      const better = !best || end < best.end || (end === best.end && s.capacity_units > stations[best.i].capacity_units);
      if (better) best = { i, start, end };
    });
    if (!best) throw new Infeasible("wash", `No wash station has room ${horizonText}.`);
    const b = best as { i: number; start: number; end: number };
    const s = stations[b.i];
    const n = Math.min(left, s.capacity_units);
    left -= n;
    insertSorted(busyW[b.i], [b.start, b.end]);
    washSteps.push({ kind: "wash", label: `Wash ${n} in ${s.name}`, resource_id: s.id, resource_name: s.name, units: n, start: iso(b.start), end: iso(b.end), slack_min: 0, critical: false, joins_run: null, minutes: washMin });
  }
  steps.push(...washSteps);
  const washDone = Math.max(...washSteps.map((s) => Date.parse(s.end)));
  const dryDone = washDone + input.drying_minutes * MIN;
  steps.push({ kind: "drying", label: "Drying", resource_id: null, resource_name: null, units: q, start: iso(washDone), end: iso(dryDone), slack_min: 0, critical: false, joins_run: null, minutes: input.drying_minutes });

  // Furnace --------------------------------------------------------------------------------
  const profile = unit.profile_id;
  if (!profile) throw new Infeasible("furnace", "The material has no default sinter profile.");
  const furnaces = input.furnaces.filter((f) => f.spec.profiles.includes(profile) && (f.cycles[profile] ?? 0) > 0);
  if (!furnaces.length) throw new Infeasible("furnace", "No furnace runs this material's sinter profile.");
  const busyF = new Map(furnaces.map((f) => [f.spec.id, [...f.busy].sort((a, b) => a[0] - b[0])]));
  let remaining: PackUnit[] = Array.from({ length: q }, (_, i) => ({
    id: `quote-unit-${i + 1}`, profile, footprint_mm: [unit.green_mm.x, unit.green_mm.y] as [number, number], height_mm: unit.green_mm.z, mass_g: unit.mass_g,
  }));
  const furnaceSteps: PromiseStep[] = [];
  const earliestNewRun = () => {
    let best: { f: PromiseFurnace; start: number; end: number } | null = null;
    for (const f of furnaces) {
      const minutes = Math.ceil(f.cycles[profile]!);
      const start = earliestGap(busyF.get(f.spec.id)!, dryDone, minutes, nextStart, limit);
      if (start === null) continue;
      const end = start + minutes * MIN;
      if (!best || end < best.end) best = { f, start, end };
    }
    return best as { f: PromiseFurnace; start: number; end: number } | null;
  };
  const byFurnace = new Map(furnaces.map((f) => [f.spec.id, f]));
  const joinable = input.open_runs
    .filter((r) => r.profile_id === profile && r.starts_at >= dryDone && r.starts_at <= limit && byFurnace.has(r.furnace_id))
    .sort((a, b) => a.ends_at - b.ends_at || a.id.localeCompare(b.id));
  const fresh = earliestNewRun();
  for (const run of joinable) {
    if (!remaining.length) break;
    if (fresh && run.ends_at > fresh.end) break;
    const f = byFurnace.get(run.furnace_id)!;
    let layout = run.layout;
    const inRun = [...run.units];
    let joined = 0;
    while (remaining.length) {
      const res = canAddToRun(layout, remaining[0], { furnace: f.spec, clearance_mm: input.tray_clearance_mm, units: inRun });
      if (!res.ok) break;
      layout = res.run;
      inRun.push(remaining.shift()!);
      joined++;
    }
    if (joined) {
      furnaceSteps.push({ kind: "furnace", label: `Join ${run.code} on ${f.name} (${joined})`, resource_id: f.spec.id, resource_name: f.name, units: joined, start: iso(run.starts_at), end: iso(run.ends_at), slack_min: 0, critical: false, joins_run: run.id, minutes: Math.round((run.ends_at - run.starts_at) / MIN) });
    }
  }
  while (remaining.length) {
    let best: { f: PromiseFurnace; start: number; end: number; ids: Set<string> } | null = null;
    for (const f of furnaces) {
      const packed = packTrays({ clearance_mm: input.tray_clearance_mm, furnaces: [f.spec], units: remaining });
      const first = packed.runs[0];
      if (!first) continue;
      const minutes = Math.ceil(f.cycles[profile]!);
      const start = earliestGap(busyF.get(f.spec.id)!, dryDone, minutes, nextStart, limit);
      if (start === null) continue;
      const end = start + minutes * MIN;
      const ids = new Set(first.trays.flatMap((t) => t.placements.map((p) => p.unit)));
      if (!best || end < best.end || (end === best.end && ids.size > best.ids.size)) best = { f, start, end, ids };
    }
    if (!best) throw new Infeasible("furnace", `No furnace can take this part (trays, height or load) or has room ${horizonText}.`);
    const b = best as { f: PromiseFurnace; start: number; end: number; ids: Set<string> };
    insertSorted(busyF.get(b.f.spec.id)!, [b.start, b.end]);
    remaining = remaining.filter((u) => !b.ids.has(u.id));
    furnaceSteps.push({ kind: "furnace", label: `New run on ${b.f.name} (${b.ids.size})`, resource_id: b.f.spec.id, resource_name: b.f.name, units: b.ids.size, start: iso(b.start), end: iso(b.end), slack_min: 0, critical: false, joins_run: null, minutes: Math.round((b.end - b.start) / MIN) });
  }
  steps.push(...furnaceSteps);
  // Someone has to unload a finished run.
  const unloaded = Math.max(...furnaceSteps.map((s) => nextStart(Date.parse(s.end))));

  // Finishing ------------------------------------------------------------------------------
  const release = unloaded;
  const lanes = Math.max(1, Math.floor(input.finishing_lanes));
  const work = (t: number, minutes: number) => (cal ? cal.addWork(t, minutes * MIN) : t + minutes * MIN);
  // The machinists as one pool working `lanes` minutes per staffed minute, first come first
  // served. The pool never idles while released work waits, so more work released ahead, a
  // later release or fewer machinists can only make it free later: the date stays monotone.
  const ahead = input.finishing_queue.filter((j) => j.release <= release && j.minutes > 0).sort((a, b) => a.release - b.release);
  let poolFree = now;
  let queuedAhead = 0;
  for (const j of ahead) {
    poolFree = work(Math.max(poolFree, j.release), j.minutes / lanes);
    queuedAhead += j.minutes;
    if (poolFree > limit) throw new Infeasible("finishing", `The finishing queue ahead runs past the ${input.horizon_days}-day planning horizon.`);
  }
  const lotMinutes = unit.finishing_minutes * input.finish_quantity;
  // A unit is one machinist's work: the lot takes ⌈units / machinists⌉ units' time at least.
  const finishMinutes = Math.ceil(Math.ceil(input.finish_quantity / lanes) * unit.finishing_minutes);
  const workStart = finishMinutes > 0 ? nextStart(Math.max(poolFree, release)) : release;
  const completion = work(workStart, finishMinutes);
  if (completion > limit) throw new Infeasible("finishing", `Finishing would end after the ${input.horizon_days}-day planning horizon.`);
  const waitMin = Math.max(0, Math.round((workStart - (finishMinutes > 0 ? nextStart(release) : release)) / MIN));
  const queueText = queuedAhead > 0 ? `; ${(queuedAhead / 60).toFixed(1)} h queued ahead` : "";
  steps.push({
    kind: "finishing", label: `Finish ${input.finish_quantity} (${lanes} machinist${lanes === 1 ? "" : "s"}${queueText})`, resource_id: null, resource_name: null,
    units: input.finish_quantity, start: iso(workStart), end: iso(completion), slack_min: 0, critical: true, joins_run: null, minutes: finishMinutes,
  });

  // Slack: the time from a step's end to the start of the first step of the next phase; the
  // furnace's next phase is the finishing work, which may wait for the queue ahead.
  const firstStart = (kind: PromiseStep["kind"]) => Math.min(...steps.filter((s) => s.kind === kind).map((s) => Date.parse(s.start)));
  const nextPhase: Record<PromiseStep["kind"], number> = {
    print: firstStart("wash"),
    wash: washDone,
    drying: firstStart("furnace"),
    // Only a wait for the queue counts; the hours between the release and the next shift do not,
    // since a later unload would meet the same shift change.
    furnace: unloaded + waitMin * MIN,
    finishing: completion,
  };
  const gateOf = (kind: PromiseStep["kind"]) => (kind === "wash" ? washDone : kind === "print" ? printDone : kind === "furnace" ? unloaded : kind === "drying" ? dryDone : completion);
  for (const s of steps) {
    if (s.kind === "finishing") continue;
    const end = Date.parse(s.end);
    const own = s.kind === "furnace" ? nextStart(end) : end;
    s.slack_min = Math.max(0, Math.round((nextPhase[s.kind] - own) / MIN));
  }
  // Critical: the step that closes its phase with no slack, and every later phase's closing
  // step has none either (a wait anywhere after it, e.g. for the finishing queue, takes it off).
  const order: PromiseStep["kind"][] = ["print", "wash", "drying", "furnace", "finishing"];
  const gateSlack = new Map(order.map((k) => {
    const gates = steps.filter((s) => s.kind === k && (k === "finishing" || (k === "furnace" ? nextStart(Date.parse(s.end)) : Date.parse(s.end)) === gateOf(k)));
    return [k, gates.length ? Math.min(...gates.map((g) => g.slack_min)) : 0] as const;
  }));
  for (const s of steps) {
    if (s.kind === "finishing") continue;
    const own = s.kind === "furnace" ? nextStart(Date.parse(s.end)) : Date.parse(s.end);
    const later = order.slice(order.indexOf(s.kind) + 1);
    s.critical = own === gateOf(s.kind) && s.slack_min === 0 && later.every((k) => gateSlack.get(k) === 0);
  }
  // The printed-at variant has no print steps; the gate of a phase without steps counts as 0.
  const critical = steps.filter((s) => s.critical);

  // P90: stretch each phase's closing step by its recorded p90 ratio of actual to planned.
  const stretch = (kind: SpreadKind) => {
    const gate = steps.filter((s) => s.kind === kind).sort((a, b) => Date.parse(b.end) - Date.parse(a.end))[0];
    return gate ? Math.max(0, input.spread[kind].p90_ratio - 1) * gate.minutes : 0;
  };
  const extra = stretch("print") + stretch("wash") + stretch("furnace") + stretch("finishing");
  const p90 = completion + Math.ceil(extra) * MIN;

  return {
    feasible: true,
    completion: iso(completion),
    p90: iso(p90),
    p90_basis: input.spread,
    steps,
    plates: planned,
    critical_path: critical.map((s) => s.label),
    finishing: { release, minutes: lotMinutes, queued_ahead_min: Math.round(queuedAhead), wait_min: waitMin, lanes },
  };
}

/**
 * "How many by date D": the largest good quantity whose plan completes by `deadline`, searched
 * by bisection over 1…maxQuantity (completion grows with quantity: more plates, batches, runs).
 */
export function maxQuantityBy(
  deadline: number,
  maxQuantity: number,
  inputFor: (quantity: number) => PromiseInput,
): { quantity: number; completion: string | null } {
  const fits = (n: number) => {
    const r = planPromise(inputFor(n));
    return r.feasible && Date.parse(r.completion) <= deadline ? r.completion : null;
  };
  let lo = 0;
  let loCompletion: string | null = null;
  let hi = maxQuantity + 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    const c = fits(mid);
    if (c) {
      lo = mid;
      loCompletion = c;
    } else hi = mid;
  }
  return { quantity: lo, completion: loCompletion };
}

/**
 * Spread of real durations: the p90 of actual ÷ planned over completed bookings (linear
 * interpolation between order statistics, Hyndman & Fan 1996 definition 7, the default of R and
 * of simple-statistics' quantile). Fewer than `minSamples` records: the fallback, marked so.
 */
export function spreadFrom(ratios: number[], fallback: number, minSamples = 5): Spread {
  const clean = ratios.filter((r) => Number.isFinite(r) && r > 0).sort((a, b) => a - b);
  if (clean.length < minSamples) return { p90_ratio: fallback, samples: clean.length, source: "fallback" };
  const h = (clean.length - 1) * 0.9;
  const lo = Math.floor(h);
  const v = clean[lo] + (h - lo) * ((clean[lo + 1] ?? clean[lo]) - clean[lo]);
  return { p90_ratio: Math.max(1, v), samples: clean.length, source: "history" };
}
