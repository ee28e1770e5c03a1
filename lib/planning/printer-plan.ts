// Builds onto printers. A build needs a printer that takes its material and whose build volume
// holds it (X and Y may swap, Z stays vertical); it runs uninterrupted, never overlaps another
// build or a blocked window, never starts before the printer is available and, when the shop
// sets staffed hours, starts inside them (printing runs unattended, starting does not).
//
// Start: earliest-due-date list scheduling (Jackson's rule, 1955 [from memory], applied as a list rule): builds
// in due order, each on the compatible printer where it would finish first. Each printer runs its
// builds in due order and a build may drop into an idle gap left before a blocked window, which
// delays nobody. Then a local search moves and swaps builds off the printer that finishes last
// while the maximum lateness stays no worse than the plain rule's, and a second one moves and
// swaps builds off the printer with the latest build (against its due date) while the makespan
// stays where the first search left it.

import { ComputationError } from "@/lib/errors";
import { printerPlanInstanceSchema, type PrinterPlanInstance, type PrinterPlanInstanceInput } from "./instances";
import { StaffedCalendar, type StaffedHours } from "./staffed-hours";

const MINUTE_MS = 60_000;

export interface PlannedBuild {
  build: string;
  printer: string;
  start: string;
  end: string;
}

export interface UnplacedBuild {
  build: string;
  reason: string;
}

export interface PrinterPlanMetrics {
  /** Minutes from `now` to the end of the last build (0 when nothing is planned). */
  makespan_min: number;
  /** max(end − due) in minutes; negative when every build is early; null when nothing is planned. */
  max_lateness_min: number | null;
  late_count: number;
  /** Σ max(0, end − due) in minutes. */
  total_tardiness_min: number;
}

export interface PrinterLowerBound {
  /** max(single, load): no plan can finish earlier (minutes from `now`). */
  makespan_min: number;
  /** Longest "earliest finish on its best printer" over the builds. */
  single_min: number;
  /** Best load bound over sets of printers (see printerLowerBound). */
  load_min: number;
}

export interface PrinterPlanResult {
  assignments: PlannedBuild[];
  unplaced: UnplacedBuild[];
  metrics: PrinterPlanMetrics;
  /** The plain earliest-due-date list schedule the search started from. */
  baseline: PrinterPlanMetrics;
  lowerBound: PrinterLowerBound;
  /** Local-search moves applied. */
  moves: number;
  /** The lateness pass stopped at `budgetMs` rather than because no move helped. */
  timed_out: boolean;
}

export interface PrinterPlanOptions {
  /** false: return the plain EDD list schedule. */
  improve?: boolean;
  /** Upper limit on local-search moves (keeps the run time bounded and the result repeatable). */
  maxMoves?: number;
  /** Time allowed for the lateness pass (ms of `clock`); none = until no move helps. */
  budgetMs?: number;
  clock?: () => number;
  /** Overrides the instance's staffed hours. */
  staffed_hours?: StaffedHours | null;
}

interface PrinterModel {
  idx: number;
  id: string;
  avail: number;
  /** Blocked windows, merged, sorted, clipped to start no earlier than `avail`. */
  blocks: [number, number][];
}

interface BuildModel {
  idx: number;
  id: string;
  p: number;
  due: number;
  rank: number;
  compat: number[];
}

interface Model {
  now: number;
  printers: PrinterModel[];
  builds: BuildModel[];
  unplaced: UnplacedBuild[];
  cal: StaffedCalendar | null;
}

function parseTime(s: string, field: string): number {
  const t = Date.parse(s);
  if (Number.isNaN(t)) throw new ComputationError(`${field} is not a readable time: "${s}"`, field);
  return t;
}

function fitsVolume(size: readonly number[], vol: readonly number[]): boolean {
  const [x, y, z] = size;
  const [X, Y, Z] = vol;
  return z <= Z && ((x <= X && y <= Y) || (y <= X && x <= Y));
}

function buildModel(inst: PrinterPlanInstance, staffed: StaffedHours | null): Model {
  const now = parseTime(inst.now, "now");
  const seenP = new Set<string>();
  const printers: PrinterModel[] = inst.printers.map((p, idx) => {
    if (seenP.has(p.id)) throw new ComputationError(`printer id ${p.id} appears twice`, "printers");
    seenP.add(p.id);
    const avail = Math.max(now, p.available_from ? parseTime(p.available_from, `printer ${p.id} available_from`) : now);
    const raw = (p.blocked ?? [])
      .map((w) => [parseTime(w.start, "blocked.start"), parseTime(w.end, "blocked.end")] as [number, number])
      .filter(([s, e]) => e > avail && e > s)
      .map(([s, e]) => [Math.max(s, avail), e] as [number, number])
      .sort((a, b) => a[0] - b[0]);
    const blocks: [number, number][] = [];
    for (const w of raw) {
      const last = blocks[blocks.length - 1];
      if (last && w[0] <= last[1]) last[1] = Math.max(last[1], w[1]);
      else blocks.push([w[0], w[1]]);
    }
    return { idx, id: p.id, avail, blocks };
  });
  const seenB = new Set<string>();
  const unplaced: UnplacedBuild[] = [];
  const builds: BuildModel[] = [];
  for (const b of inst.builds) {
    if (seenB.has(b.id)) throw new ComputationError(`build id ${b.id} appears twice`, "builds");
    seenB.add(b.id);
    if (!(b.duration_min > 0) || !Number.isFinite(b.duration_min)) {
      throw new ComputationError(`build ${b.id} needs a positive duration`, "duration_min");
    }
    const takers = inst.printers.filter((p) => p.materials.includes(b.material));
    const compat = inst.printers
      .map((p, i) => ({ p, i }))
      .filter(({ p }) => p.materials.includes(b.material) && fitsVolume(b.size_mm, p.build_volume_mm))
      .map(({ i }) => i);
    if (compat.length === 0) {
      unplaced.push({
        build: b.id,
        reason:
          takers.length === 0
            ? `no printer takes material ${b.material}`
            : `${b.size_mm.join("×")} mm does not fit the build volume of any printer for ${b.material}`,
      });
      continue;
    }
    builds.push({
      idx: builds.length,
      id: b.id,
      p: Math.round(b.duration_min * MINUTE_MS),
      due: parseTime(b.due, `build ${b.id} due`),
      rank: 0,
      compat,
    });
  }
  [...builds]
    .sort((a, b) => a.due - b.due || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0))
    .forEach((b, r) => (b.rank = r));
  return { now, printers, builds, unplaced, cal: staffed ? new StaffedCalendar(staffed, now) : null };
}

/**
 * One printer's calendar while builds are added in due order: a frontier after the last build,
 * plus the idle gaps left behind it (before a blocked window or a staffed start).
 */
class Timeline {
  frontier: number;
  holes: [number, number][] = [];
  private bi = 0;

  constructor(
    readonly pr: PrinterModel,
    readonly cal: StaffedCalendar | null,
  ) {
    this.frontier = pr.avail;
  }

  private staffed(t: number): number {
    return this.cal ? this.cal.nextStart(t) : t;
  }

  /** Earliest start for a build of length p, and where it would go. */
  peek(p: number): { start: number; hole: number } {
    for (let h = 0; h < this.holes.length; h++) {
      const [s, e] = this.holes[h];
      if (e - s < p) continue;
      const t = this.staffed(s);
      if (t + p <= e) return { start: t, hole: h };
    }
    const blocks = this.pr.blocks;
    let t = this.staffed(this.frontier);
    let bi = this.bi;
    for (;;) {
      while (bi < blocks.length && blocks[bi][1] <= t) bi++;
      if (bi < blocks.length && blocks[bi][0] < t + p) {
        t = this.staffed(blocks[bi][1]);
        continue;
      }
      return { start: t, hole: -1 };
    }
  }

  add(p: number): number {
    const { start, hole } = this.peek(p);
    if (hole >= 0) {
      const [s, e] = this.holes[hole];
      const parts: [number, number][] = [];
      if (start > s) parts.push([s, start]);
      if (e > start + p) parts.push([start + p, e]);
      this.holes.splice(hole, 1, ...parts);
      return start;
    }
    const blocks = this.pr.blocks;
    let cur = this.frontier;
    while (this.bi < blocks.length && blocks[this.bi][0] < start) {
      const [bs, be] = blocks[this.bi];
      if (bs > cur) this.holes.push([cur, bs]);
      cur = Math.max(cur, be);
      if (be <= start) this.bi++;
      else break;
    }
    if (start > cur) this.holes.push([cur, start]);
    this.frontier = start + p;
    return start;
  }
}

interface PrinterState {
  finish: number;
  lmax: number;
  tard: number;
  /** Longest idle gap left before the finish. */
  idle: number;
}

/**
 * Times `seq` (build indices sorted by due rank) on printer `pr`, with build `drop` left out and
 * build `add` put in at its due-rank place (−1: none), without building the edited list.
 */
function timeSequence(
  model: Model,
  pr: PrinterModel,
  seq: readonly number[],
  starts?: number[],
  drop = -1,
  add = -1,
): PrinterState {
  const builds = model.builds;
  const tl = new Timeline(pr, model.cal);
  let finish = model.now;
  let lmax = Number.NEGATIVE_INFINITY;
  let tard = 0;
  const visit = (bi: number) => {
    const b = builds[bi];
    const s = tl.add(b.p);
    if (starts) starts[bi] = s;
    const end = s + b.p;
    if (end > finish) finish = end;
    const late = end - b.due;
    if (late > lmax) lmax = late;
    if (late > 0) tard += late;
  };
  const addRank = add >= 0 ? builds[add].rank : Infinity;
  let pending = add >= 0;
  for (const bi of seq) {
    if (pending && builds[bi].rank > addRank) {
      visit(add);
      pending = false;
    }
    if (bi !== drop) visit(bi);
  }
  if (pending) visit(add);
  let idle = 0;
  for (const [hs, he] of tl.holes) idle = Math.max(idle, he - hs);
  return { finish, lmax, tard, idle };
}

/** The list timeSequence(…, drop, add) times. */
function edited(model: Model, seq: readonly number[], drop: number, add: number): number[] {
  const out = drop >= 0 ? seq.filter((x) => x !== drop) : [...seq];
  return add >= 0 ? insertByRank(model, out, add) : out;
}

/** Minimum M ≥ now with Σ_{i∈S} (free time of printer i in [now, M]) ≥ work. */
function loadReach(model: Model, set: readonly number[], work: number): number {
  const events: [number, number][] = [];
  for (const i of set) {
    const pr = model.printers[i];
    events.push([pr.avail, 1]);
    for (const [s, e] of pr.blocks) {
      events.push([s, -1]);
      events.push([e, 1]);
    }
  }
  events.sort((a, b) => a[0] - b[0]);
  let t = model.now;
  let slope = 0;
  let done = 0;
  for (const [at, ds] of events) {
    if (at > t) {
      if (slope > 0 && done + slope * (at - t) >= work) return t + (work - done) / slope;
      done += slope * (at - t);
      t = at;
    }
    slope += ds;
  }
  return t + (work - done) / slope;
}

/**
 * Lower bound on the makespan. (a) Each build alone: its earliest finish on its best compatible
 * printer (availability, blocked windows and staffed starts respected). (b) Load: the builds whose
 * compatible printers all lie in a set S must be done by S, so the makespan is at least the first
 * M at which S has had that much free time (availability offsets and blocked windows subtracted).
 * With up to 16 printers every set S is tried (a subset-sum transform gives each set's work);
 * beyond that, the builds' own compatibility sets, their pairwise unions, and all printers.
 */
function printerLowerBound(model: Model): PrinterLowerBound {
  if (model.builds.length === 0) return { makespan_min: 0, single_min: 0, load_min: 0 };
  let single = model.now;
  for (const b of model.builds) {
    let best = Infinity;
    for (const i of b.compat) {
      const tl = new Timeline(model.printers[i], model.cal);
      best = Math.min(best, tl.peek(b.p).start + b.p);
    }
    single = Math.max(single, best);
  }
  let load = model.now;
  const n = model.printers.length;
  if (n <= 16) {
    const work = new Float64Array(1 << n);
    for (const b of model.builds) {
      let mask = 0;
      for (const i of b.compat) mask |= 1 << i;
      work[mask] += b.p;
    }
    for (let i = 0; i < n; i++) {
      for (let mask = 0; mask < 1 << n; mask++) if (mask & (1 << i)) work[mask] += work[mask ^ (1 << i)];
    }
    for (let mask = 1; mask < 1 << n; mask++) {
      if (work[mask] <= 0) continue;
      const set: number[] = [];
      for (let i = 0; i < n; i++) if (mask & (1 << i)) set.push(i);
      load = Math.max(load, loadReach(model, set, work[mask]));
    }
  } else {
    const sets = new Map<string, number[]>();
    const keyOf = (s: number[]) => [...new Set(s)].sort((a, b) => a - b);
    for (const b of model.builds) {
      const s = keyOf(b.compat);
      sets.set(s.join(","), s);
    }
    const base = [...sets.values()];
    for (let i = 0; i < base.length; i++) {
      for (let j = i + 1; j < base.length; j++) {
        const s = keyOf([...base[i], ...base[j]]);
        sets.set(s.join(","), s);
      }
    }
    const all = model.printers.map((p) => p.idx);
    sets.set(all.join(","), all);
    for (const s of sets.values()) {
      const inS = new Set(s);
      let work = 0;
      for (const b of model.builds) if (b.compat.every((i) => inS.has(i))) work += b.p;
      if (work > 0) load = Math.max(load, loadReach(model, s, work));
    }
  }
  const toMin = (t: number) => (t - model.now) / MINUTE_MS;
  return { makespan_min: toMin(Math.max(single, load)), single_min: toMin(single), load_min: toMin(load) };
}

function metricsOf(model: Model, starts: number[]): PrinterPlanMetrics {
  if (model.builds.length === 0) return { makespan_min: 0, max_lateness_min: null, late_count: 0, total_tardiness_min: 0 };
  let last = model.now;
  let lmax = Number.NEGATIVE_INFINITY;
  let late = 0;
  let tard = 0;
  for (const b of model.builds) {
    const end = starts[b.idx] + b.p;
    last = Math.max(last, end);
    const l = end - b.due;
    lmax = Math.max(lmax, l);
    if (l > 0) {
      late++;
      tard += l;
    }
  }
  return {
    makespan_min: (last - model.now) / MINUTE_MS,
    max_lateness_min: lmax / MINUTE_MS,
    late_count: late,
    total_tardiness_min: tard / MINUTE_MS,
  };
}

function insertByRank(model: Model, seq: readonly number[], bi: number): number[] {
  const r = model.builds[bi].rank;
  let k = 0;
  while (k < seq.length && model.builds[seq[k]].rank < r) k++;
  return [...seq.slice(0, k), bi, ...seq.slice(k)];
}

/** Plain EDD list scheduling: builds by due date, each where it finishes first. */
function eddAssign(model: Model): number[][] {
  const lines = model.printers.map((p) => new Timeline(p, model.cal));
  const seqs: number[][] = model.printers.map(() => []);
  const order = [...model.builds].sort((a, b) => a.rank - b.rank);
  for (const b of order) {
    let best = -1;
    let bestEnd = Infinity;
    for (const i of b.compat) {
      const end = lines[i].peek(b.p).start + b.p;
      if (end < bestEnd) {
        bestEnd = end;
        best = i;
      }
    }
    lines[best].add(b.p);
    seqs[best].push(b.idx);
  }
  return seqs;
}

/**
 * Local search on the assignment: take the printer that finishes last and move one of its builds
 * to another printer, or swap it for a shorter one there, choosing the move that lowers the later
 * of the two finishes most (then total tardiness); a move must keep both printers' maximum
 * lateness within `lateCap`. Stops at the lower bound, when no move helps, or after maxMoves.
 */
function improve(model: Model, seqs: number[][], lateCap: number, bound: number, maxMoves: number): number {
  const state = seqs.map((s, i) => timeSequence(model, model.printers[i], s));
  const builds = model.builds;
  const compatSet = builds.map((b) => new Set(b.compat));
  let moves = 0;
  while (moves < maxMoves) {
    let crit = 0;
    for (let i = 1; i < state.length; i++) if (state[i].finish > state[crit].finish) crit = i;
    const fc = state[crit].finish;
    if (fc <= bound) break;
    const critPr = model.printers[crit];
    type Move = { j: number; k: number; j2: number; sa: PrinterState; sb: PrinterState; key: number; tie: number };
    let best: Move | null = null;
    const consider = (j: number, k: number, j2: number, sa: PrinterState) => {
      const sb = timeSequence(model, model.printers[k], seqs[k], undefined, j2, j);
      if (sb.lmax > lateCap) return;
      const key = Math.max(sa.finish, sb.finish);
      if (key >= fc) return;
      const tie = sa.tard + sb.tard - state[crit].tard - state[k].tard;
      if (!best || key < best.key || (key === best.key && tie < best.tie)) best = { j, k, j2, sa, sb, key, tie };
    };
    const okCrit = (sa: PrinterState) => sa.lmax <= lateCap && sa.finish < fc;
    const mine = seqs[crit];
    for (const j of mine) {
      const sa = timeSequence(model, critPr, mine, undefined, j);
      if (!okCrit(sa)) continue;
      for (const k of builds[j].compat) {
        // Adding a build never brings a printer's finish forward (an idle gap may absorb it).
        if (k === crit || state[k].finish + builds[j].p >= fc + state[k].idle) continue;
        consider(j, k, -1, sa);
      }
    }
    if (!best) {
      for (const j of mine) {
        for (const k of builds[j].compat) {
          if (k === crit || state[k].finish >= fc) continue;
          for (const j2 of seqs[k]) {
            const grow = builds[j].p - builds[j2].p;
            // Only swaps that shorten this printer and plausibly leave the other below fc.
            if (grow <= 0 || !compatSet[j2].has(crit) || state[k].finish + grow >= fc + state[k].idle) continue;
            const sa = timeSequence(model, critPr, mine, undefined, j, j2);
            if (okCrit(sa)) consider(j, k, j2, sa);
          }
        }
      }
    }
    if (!best) break;
    const m = best as Move;
    seqs[crit] = edited(model, mine, m.j, m.j2);
    seqs[m.k] = edited(model, seqs[m.k], m.j2, m.j);
    state[crit] = m.sa;
    state[m.k] = m.sb;
    moves++;
  }
  return moves;
}

/**
 * Second pass, after the makespan search: lowers the maximum lateness. Take the printer whose
 * latest build is the latest against its due date and move one of its builds elsewhere, or swap
 * it for another printer's build, choosing the move that lowers the larger lateness of the two
 * printers most; neither printer may then finish after `finishCap` (the plan's makespan), so the
 * makespan never grows. Stops when no move lowers the maximum lateness or after maxMoves.
 */
function improveLateness(model: Model, seqs: number[][], finishCap: number, maxMoves: number, outOfTime: () => boolean): number {
  const state = seqs.map((s, i) => timeSequence(model, model.printers[i], s));
  const builds = model.builds;
  let moves = 0;
  while (moves < maxMoves && !outOfTime()) {
    let crit = 0;
    for (let i = 1; i < state.length; i++) if (state[i].lmax > state[crit].lmax) crit = i;
    const lc = state[crit].lmax;
    if (lc <= 0) break;
    const critPr = model.printers[crit];
    const mine = seqs[crit];
    type Move = { j: number; k: number; j2: number; sa: PrinterState; sb: PrinterState; key: number; tie: number };
    let best: Move | null = null;
    const consider = (j: number, k: number, j2: number, sa: PrinterState) => {
      if (sa.lmax >= lc || sa.finish > finishCap) return;
      const sb = timeSequence(model, model.printers[k], seqs[k], undefined, j2, j);
      if (sb.finish > finishCap) return;
      const key = Math.max(sa.lmax, sb.lmax);
      if (key >= lc) return;
      const tie = sa.tard + sb.tard - state[crit].tard - state[k].tard;
      if (!best || key < best.key || (key === best.key && tie < best.tie)) best = { j, k, j2, sa, sb, key, tie };
    };
    for (const j of mine) {
      const others = builds[j].compat.filter((k) => k !== crit && state[k].lmax < lc);
      if (others.length === 0) continue;
      const sa = timeSequence(model, critPr, mine, undefined, j);
      if (sa.lmax >= lc) continue;
      for (const k of others) consider(j, k, -1, sa);
    }
    if (!best) {
      for (const j of mine) {
        for (const k of builds[j].compat) {
          if (k === crit || state[k].lmax >= lc) continue;
          for (const j2 of seqs[k]) {
            if (builds[j2].p >= builds[j].p || !builds[j2].compat.includes(crit)) continue;
            consider(j, k, j2, timeSequence(model, critPr, mine, undefined, j, j2));
          }
        }
      }
    }
    if (!best) break;
    const m = best as Move;
    seqs[crit] = edited(model, mine, m.j, m.j2);
    seqs[m.k] = edited(model, seqs[m.k], m.j2, m.j);
    state[crit] = m.sa;
    state[m.k] = m.sb;
    moves++;
  }
  return moves;
}

/** Plans `instance` (parsed or raw; validated here). */
export function planPrinters(
  instance: PrinterPlanInstance | PrinterPlanInstanceInput,
  options: PrinterPlanOptions = {},
): PrinterPlanResult {
  const inst = printerPlanInstanceSchema.parse(instance);
  const staffed = options.staffed_hours === undefined ? (inst.staffed_hours ?? null) : options.staffed_hours;
  const model = buildModel(inst, staffed);
  const lowerBound = printerLowerBound(model);
  const seqs = eddAssign(model);
  const starts = new Array<number>(model.builds.length).fill(0);
  const timeAll = () =>
    seqs.forEach((s, i) => {
      timeSequence(model, model.printers[i], s, starts);
    });
  timeAll();
  const baseline = metricsOf(model, starts);
  let moves = 0;
  let timedOut = false;
  if (options.improve !== false && model.builds.length > 0) {
    const cap = (baseline.max_lateness_min ?? 0) * MINUTE_MS;
    const bound = model.now + lowerBound.makespan_min * MINUTE_MS;
    const maxMoves = options.maxMoves ?? 5000;
    moves = improve(model, seqs, cap, bound, maxMoves);
    timeAll();
    const finishCap = Math.max(...model.builds.map((b) => starts[b.idx] + b.p));
    const clock = options.clock ?? (() => Date.now());
    const t0 = clock();
    const outOfTime = () => (timedOut ||= options.budgetMs !== undefined && clock() - t0 > options.budgetMs);
    moves += improveLateness(model, seqs, finishCap, Math.max(0, maxMoves - moves), outOfTime);
    timeAll();
  }
  const assignments: PlannedBuild[] = [];
  seqs.forEach((s, i) => {
    for (const bi of s) {
      const b = model.builds[bi];
      assignments.push({
        build: b.id,
        printer: model.printers[i].id,
        start: new Date(starts[bi]).toISOString(),
        end: new Date(starts[bi] + b.p).toISOString(),
      });
    }
  });
  assignments.sort((a, b) => (a.printer < b.printer ? -1 : a.printer > b.printer ? 1 : a.start < b.start ? -1 : 1));
  return { assignments, unplaced: model.unplaced, metrics: metricsOf(model, starts), baseline, lowerBound, moves, timed_out: timedOut };
}
