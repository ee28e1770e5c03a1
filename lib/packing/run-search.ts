// Local search that takes runs away from a valid plan, one at a time, until the plan meets its
// lower bound or the budget runs out. The plan it starts from is kept unless a plan with fewer
// runs is found, so the result is never worse than the start.
//
// One step "empties the weakest run": its units go to a pool, and the search then repacks one of
// the remaining runs at a time from its own units plus the pooled ones, keeping the repacked run
// when the pool's weight does not grow. The pool empties when every unit has found a place, and
// the plan then has one run fewer. Pooled units that stay homeless gain weight (so they are placed
// first in later repacks and are harder to push out again), which breaks cycles. This is the
// "empty the bin with the least filling and redistribute its items" neighbourhood of A. Lodi,
// S. Martello & D. Vigo, "Heuristic and metaheuristic approaches for a class of two-dimensional
// bin packing problems", INFORMS J. Computing 11(4):345–357 (1999), with the penalised pool of the
// goal-driven search of L. Wei, W.-C. Oon, W. Zhu & A. Lim, "A goal-driven approach to the 2D bin
// packing and variable-sized bin packing problems", EJOR 224(1):110–121 (2013) [both from memory].
//
// Deterministic for a seed: the work budget counts placement attempts, not time; the optional
// deadline only cuts the search short (and then the result depends on the machine's speed).

import { GEOMETRY_EPS, type PlacementRule } from "./rectangles";
import { RunState, type TrayChoice } from "./run-solver";
import { packAllOnTray } from "./tile-search";
import { FIT_TOLERANCE_MM, type ItemModel, type ProfileModel } from "./tray-model";
import { mulberry32 } from "@/lib/random";

export interface RunSearchOptions {
  seed: number;
  /** Placement attempts allowed (one attempt = one unit tried in one run). */
  work: number;
  /** Stop when clock() passes this (same unit as clock). */
  deadline?: number;
  clock?: () => number;
}

export type StopReason = "bound" | "budget" | "time" | "start";

export interface RunSearchResult {
  runs: RunState[];
  work: number;
  stop: StopReason;
}

/**
 * Share of repacks done by repackBalanced rather than first fit. Measured on the generated furnace
 * mixes (where load and room both bind, first fit alone left a run too many on two seeds of five
 * and 0.5 reached the bound on all) and on the 2-D bin-packing classes (no load: no change
 * beyond the noise of a timed search).
 */
const BALANCED_SHARE = 0.5;
const RULES: readonly PlacementRule[] = ["short-side", "contact", "short-side", "bottom-left", "area", "long-side"];

interface Ctx {
  pm: ProfileModel;
  rnd: () => number;
  work: number;
  limit: number;
  deadline: number;
  clock: () => number;
  timedOut: boolean;
}

function outOfBudget(ctx: Ctx): boolean {
  if (ctx.work >= ctx.limit) return true;
  if (ctx.deadline !== Infinity && ctx.clock() > ctx.deadline) {
    ctx.timedOut = true;
    return true;
  }
  return false;
}

/** Repacks the runs `bases` (first fit over them, in order) from `order`; returns the runs and the units left out. */
function repack(ctx: Ctx, bases: readonly RunState[], order: readonly ItemModel[], rule: PlacementRule, trays: TrayChoice): { runs: RunState[]; out: ItemModel[] } {
  const runs = bases.map((b) => new RunState(b.f, ctx.pm.minSide));
  const out: ItemModel[] = [];
  for (const it of order) {
    let placed = false;
    for (const run of runs) {
      ctx.work++;
      if (run.tryAdd(it, rule, trays)) {
        placed = true;
        break;
      }
    }
    if (!placed) out.push(it);
  }
  return { runs, out };
}

/**
 * Repacks the runs `bases` together, each unit going first to the run whose spare (area, load)
 * best matches the unit's (area, load), the largest dot product of the two shares: the
 * vector-packing rule of Panigrahy, Talwar, Uyeda & Wieder, "Heuristics for Vector Bin Packing"
 * (Microsoft Research, 2011) [from memory], used across runs. Where load binds as well as room,
 * first fit crams the load into the first run and the room into the last; this spreads both.
 */
function repackBalanced(ctx: Ctx, bases: readonly RunState[], order: readonly ItemModel[], rule: PlacementRule): { runs: RunState[]; out: ItemModel[] } {
  const runs = bases.map((b) => new RunState(b.f, ctx.pm.minSide));
  const out: ItemModel[] = [];
  const score = new Float64Array(runs.length);
  const idx = runs.map((_, i) => i);
  for (const it of order) {
    for (let r = 0; r < runs.length; r++) {
      const run = runs[r];
      score[r] = (it.area / run.f.runArea) * (1 - run.area / run.f.runArea) + (it.mass / run.f.load) * (1 - run.mass / run.f.load);
    }
    idx.sort((a, b) => score[b] - score[a] || a - b);
    let placed = false;
    for (const r of idx) {
      ctx.work++;
      if (runs[r].tryAdd(it, rule, "best")) {
        placed = true;
        break;
      }
    }
    if (!placed) out.push(it);
  }
  return { runs, out };
}

/** Tries to place `it` beside the present layout of `run` (a copy), or returns null. */
function insertInto(ctx: Ctx, run: RunState, it: ItemModel): RunState | null {
  if (!it.eligibleMask.has(run.f.idx) || !run.massFits(it)) return null;
  if (it.area > run.f.runArea - run.area + GEOMETRY_EPS) return null;
  ctx.work++;
  // Look first, copy only on success: most tries find no room. Whether a piece fits does not
  // depend on the placement rule (each rule only ranks the free rectangles that can take it), so
  // one rule answers for all.
  for (let t = 0; t < run.bins.length; t++) {
    if (it.area > run.bins[t].freeArea + GEOMETRY_EPS) continue;
    if (run.bins[t].find(it.pw, it.ph, "short-side", true)) {
      const c = run.clone();
      if (c.tryAdd(it, "short-side", "best")) return c;
    }
  }
  return null;
}

/**
 * Budget of one one-tray search, in its own unit (piece sizes looked at; about 30 ms for 300,000
 * on our machine); ONE_TRAY_PER_WORK of them are charged as one placement attempt, about their
 * relative cost.
 */
const ONE_TRAY_BUDGET = 300_000;
const ONE_TRAY_PER_WORK = 20;
/** Trays tried by one closing move. */
const CLOSE_TRIES = 2;

/** `run` with tray `t` laid out anew from `layout` (placements in packing coordinates). */
function withTray(run: RunState, t: number, layout: readonly { item: ItemModel; x: number; y: number; w: number; h: number; rotated: boolean }[]): RunState {
  const next = new RunState(run.f, run.minSide);
  for (const p of run.placed) {
    if (p.tray === t) continue;
    next.bins[p.tray].place({ x: p.x, y: p.y, w: p.w, h: p.h });
    next.record(p.item, p.tray, p.x, p.y, p.w, p.h, p.rotated);
  }
  for (const p of layout) {
    next.bins[t].place({ x: p.x, y: p.y, w: p.w, h: p.h });
    next.record(p.item, t, p.x, p.y, p.w, p.h, p.rotated);
  }
  return next;
}

/**
 * Lays out one tray of `run` with its own units plus `add` by the one-tray search that keeps
 * every piece (tile-search.ts packAllOnTray); null when it finds no layout.
 */
function trayWith(ctx: Ctx, run: RunState, t: number, add: readonly ItemModel[]): RunState | null {
  const f = run.f;
  const tol = FIT_TOLERANCE_MM;
  const items = [...run.placed.filter((p) => p.tray === t).map((p) => p.item), ...add];
  const res = packAllOnTray(
    f.W,
    f.D,
    items.map((it) => ({ w: it.pw + tol, h: it.ph + tol, mass: it.mass, ref: it })),
    { tol, workBudget: ONE_TRAY_BUDGET, stop: () => ctx.deadline !== Infinity && ctx.clock() > ctx.deadline },
  );
  ctx.work += Math.max(1, Math.round(res.work / ONE_TRAY_PER_WORK));
  if (!res.placements) return null;
  return withTray(
    run,
    t,
    res.placements.map((p) => ({ item: p.ref, x: p.x, y: p.y, w: p.w - tol, h: p.h - tol, rotated: p.rotated })),
  );
}

/**
 * The closing move, tried once when a run is emptied: if its units would fit, by area and load,
 * into the spare room of another run's tray, that tray is laid out anew with its own units and
 * all of them by the one-tray search that keeps every piece (tile-search.ts packAllOnTray). Greedy
 * repacks miss the tight layouts a nearly full tray needs (pieces cut from one tray and trimmed a
 * little fit back in few ways), and the search's random repacks found them for few seeds. Tries
 * the roomiest trays first; returns the new runs or null.
 */
function closeOnOneTray(ctx: Ctx, cur: RunState[], pool: readonly ItemModel[]): RunState[] | null {
  let poolArea = 0;
  let poolMass = 0;
  for (const it of pool) {
    poolArea += it.area;
    poolMass += it.mass;
  }
  const trays: { r: number; t: number; free: number }[] = [];
  cur.forEach((run, r) => {
    if (!pool.every((it) => it.eligibleMask.has(run.f.idx)) || run.mass + poolMass > run.f.load * (1 + 1e-12)) return;
    for (let t = 0; t < run.bins.length; t++) {
      const free = run.bins[t].freeArea;
      if (poolArea <= free + GEOMETRY_EPS) trays.push({ r, t, free });
    }
  });
  trays.sort((a, b) => b.free - a.free || a.r - b.r || a.t - b.t);
  for (const { r, t } of trays.slice(0, CLOSE_TRIES)) {
    if (outOfBudget(ctx)) return null;
    const next = trayWith(ctx, cur[r], t, pool);
    if (next) return cur.map((x, k) => (k === r ? next : x));
  }
  return null;
}

/**
 * Looks for a plan with the runs of `runs` except `drop`, all units placed. Returns the new runs or
 * null when the budget share `until` is spent first.
 */
function withoutRun(ctx: Ctx, runs: readonly RunState[], drop: number, until: number): RunState[] | null {
  const n = ctx.pm.items.length;
  const mult = new Float64Array(n).fill(1);
  const weight = (it: ItemModel) => it.size * mult[it.local];
  let cur = runs.filter((_, i) => i !== drop);
  let pool = [...runs[drop].placed.map((p) => p.item)];
  const closed = closeOnOneTray(ctx, cur, pool);
  if (closed) return closed;
  const poolWeight = (p: readonly ItemModel[]) => p.reduce((s, it) => s + weight(it), 0);
  // First the cheap move: pooled units into the gaps of the other runs as they stand.
  const settle = () => {
    pool.sort((a, b) => weight(b) - weight(a));
    const left: ItemModel[] = [];
    for (const it of pool) {
      let placed = false;
      for (let r = 0; r < cur.length && !placed; r++) {
        const next = insertInto(ctx, cur[r], it);
        if (next) {
          cur = cur.map((x, k) => (k === r ? next : x));
          placed = true;
        }
      }
      if (!placed) left.push(it);
    }
    pool = left;
  };
  settle();
  // A pooled unit that no remaining run's furnace takes has nowhere to go.
  const furnacesLeft = new Set(cur.map((r) => r.f.idx));
  if (pool.some((it) => !it.eligible.some((fi) => furnacesLeft.has(fi)))) return null;
  let stale = 0;
  while (pool.length > 0) {
    if (ctx.work >= until || outOfBudget(ctx)) return null;
    // One, two or three runs repacked together with the pool: more runs let units change
    // partners, which is what frees room; one run alone is the cheap move.
    const roll = ctx.rnd();
    const k = Math.min(cur.length, roll < 0.3 ? 1 : roll < 0.8 ? 2 : 3);
    const picked: number[] = [];
    while (picked.length < k) {
      const r = Math.floor(ctx.rnd() * cur.length);
      if (!picked.includes(r)) picked.push(r);
    }
    const bases = picked.map((r) => cur[r]);
    const fset = new Set(bases.map((b) => b.f.idx));
    const mine = bases.flatMap((b) => b.placed.map((p) => p.item));
    const eligible = pool.filter((it) => it.eligible.some((fi) => fset.has(fi)));
    if (eligible.length === 0) {
      // Counted as work, so that a plan where few runs can take the pool still ends.
      ctx.work++;
      stale++;
      continue;
    }
    const cands = [...mine, ...eligible];
    // Heavier first, with some noise so that repeated repacks differ.
    const noise = 0.2 + 0.4 * ctx.rnd();
    const keyed = cands.map((it) => ({ it, k: weight(it) * (1 - noise / 2 + noise * ctx.rnd()) }));
    keyed.sort((a, b) => b.k - a.k || a.it.local - b.it.local);
    const rule = RULES[Math.floor(ctx.rnd() * RULES.length)];
    const trays: TrayChoice = ctx.rnd() < 0.5 ? "best" : "first";
    const ordered = keyed.map((x) => x.it);
    // Half the repacks of two or three runs spread the units by the dot-product rule, half use
    // first fit (for one run the two are the same, so no draw).
    const balanced = bases.length > 1 && ctx.rnd() < BALANCED_SHARE;
    const { runs: next, out } = balanced ? repackBalanced(ctx, bases, ordered, rule) : repack(ctx, bases, ordered, rule, trays);
    const eligibleSet = new Set(eligible);
    const newPool = [...pool.filter((it) => !eligibleSet.has(it)), ...out];
    const before = poolWeight(pool);
    const after = poolWeight(newPool);
    if (after <= before + 1e-12 && next.every((r) => r.placed.length > 0)) {
      if (after < before - 1e-12) stale = 0;
      else stale++;
      cur = cur.map((x, i) => {
        const at = picked.indexOf(i);
        return at < 0 ? x : next[at];
      });
      pool = newPool;
      if (pool.length > 0 && after < before - 1e-12) settle();
    } else {
      stale++;
    }
    // Units that stay homeless weigh more, so later repacks place them first.
    for (const it of pool) mult[it.local] += 0.02;
    if (stale > 4 * cur.length) {
      for (const it of pool) mult[it.local] += 0.5;
      stale = 0;
    }
  }
  return cur;
}

/**
 * Removes runs from `start` while it is above the profile's bound and the budget lasts. Each
 * attempt empties one of the weakest runs (by share of the run's capacity used); a failed attempt
 * moves on to the next weakest.
 */
export function reduceRuns(pm: ProfileModel, start: RunState[], opts: RunSearchOptions): RunSearchResult {
  const ctx: Ctx = {
    pm,
    rnd: mulberry32(opts.seed),
    work: 0,
    limit: opts.work,
    deadline: opts.deadline ?? Infinity,
    clock: opts.clock ?? (() => Date.now()),
    timedOut: false,
  };
  let best = start;
  let attempt = 0;
  while (best.length > pm.bound.largest) {
    if (best.length <= 1 || outOfBudget(ctx)) break;
    // Weakest first: the least used run has the fewest units to rehouse.
    const ranked = best.map((r, i) => ({ i, v: r.value + 1e-9 * r.placed.length })).sort((a, b) => a.v - b.v || a.i - b.i);
    // An attempt that gives up at once (a pooled unit that no other run's furnace takes) passes
    // to the next weakest run; after the three weakest, the search ends.
    if (attempt >= Math.min(3, ranked.length)) break;
    const pick = ranked[attempt].i;
    // Each attempt may use all the work that is left: on the 2-D bin-packing classes, one long
    // attempt at the weakest run removed 12 runs more over 250 instances than splitting the work
    // in thirds between attempts (and 8 more than halves), at the same work.
    const before = ctx.work;
    const next = withoutRun(ctx, best, pick, ctx.limit);
    if (next) {
      best = next;
      attempt = 0;
    } else {
      // Charged at least one unit of work, so that the loop always ends.
      ctx.work = Math.max(ctx.work, before + 1);
      attempt++;
    }
  }
  const stop: StopReason = best.length <= pm.bound.largest ? "bound" : ctx.timedOut ? "time" : ctx.work >= ctx.limit ? "budget" : "start";
  return { runs: best, work: ctx.work, stop };
}
