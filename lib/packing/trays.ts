// Tray packing for furnace runs: units of one sinter profile onto the trays of one furnace,
// flat, turned 90° about Z where that helps, clearance kept (see tray-model.ts), height and load
// limits respected; fewest runs first, then urgent units in the earliest runs.

import { ComputationError } from "@/lib/errors";
import { MaxRectsBin, GEOMETRY_EPS } from "./rectangles";
import { RunState, orderByDue, packSet, solveProfile } from "./run-solver";
import { reduceRuns } from "./run-search";
import {
  buildTrayModel,
  raiseBySharing,
  fitsTray,
  furnaceModel,
  grownSize,
  parseDue,
  validateClearance,
  validateFurnace,
  validateUnit,
  type FurnaceModel,
  type ItemModel,
} from "./tray-model";
import type { PackFurnace, PackUnit, TrayPackInput, TrayPackResult, TrayRun } from "./types";

export { FIT_TOLERANCE_MM } from "./tray-model";
export type * from "./types";

export interface PackTraysOptions {
  /** Perturbed restarts per profile after the fixed heuristics (default none: they never won in our measurements). */
  restarts?: number;
  /**
   * The run-removing local search after the constructions (run-search.ts). `false` returns the
   * constructions' plan as it is. `work` counts placement attempts over the whole call (split
   * over the profiles still above their bound after the constructions, by unit count; default
   * defaultSearchWork, or searchWorkFor when a deadline is given); `seed` makes it
   * repeatable; `deadlineMs` (ms from the call's start) cuts it short whatever work is left.
   */
  search?: false | { work?: number; seed?: number; deadlineMs?: number };
  /** Wall clock for the deadline (default Date.now). */
  clock?: () => number;
}

/**
 * Default placement attempts for n units: 2,000 per unit between 20,000 and 300,000 (about
 * 0.3 s for 100 units on a busy 2-core machine, measured with the 2-D bin-packing bench).
 */
export function defaultSearchWork(n: number): number {
  return Math.min(300_000, Math.max(20_000, 2_000 * n));
}

/**
 * Placement attempts the search makes in about one millisecond at n = 60–100 on our 2-core
 * machine (measured 850–1,000 with the 2-D bin-packing bench, search running to its deadline).
 */
export const SEARCH_WORK_PER_MS = 1_000;

/**
 * Default work for a search given `deadlineMs`: about what the deadline allows on our machine, so
 * that the result stays the same for a seed wherever the machine keeps up, and the deadline cuts
 * it short where it does not.
 */
export function searchWorkFor(n: number, deadlineMs: number): number {
  return Math.max(defaultSearchWork(n), Math.round(SEARCH_WORK_PER_MS * deadlineMs));
}

/** How the search went, per call: whether every profile met its bound and what was spent. */
export interface PackSearchReport {
  /** Runs of the constructions before the search. */
  start_runs: number;
  work: number;
  /** "bound": every profile met its bound; "budget" / "time": the search stopped with some above. */
  stop: "bound" | "budget" | "time" | "off";
  ms: number;
}

function toTrayRun(run: RunState, profile: string, clearance: number): TrayRun {
  const f = run.f.furnace;
  const trays = Array.from({ length: f.tray_count }, (_, index) => ({
    index,
    placements: [] as TrayRun["trays"][number]["placements"],
  }));
  let footprintArea = 0;
  let tallest = 0;
  for (const p of run.placed) {
    const [fw, fd] = p.item.unit.footprint_mm;
    const w = p.rotated ? fd : fw;
    const d = p.rotated ? fw : fd;
    trays[p.tray].placements.push({ unit: p.item.unit.id, x: p.x + clearance, y: p.y + clearance, w, d, rotated: p.rotated });
    footprintArea += fw * fd;
    tallest = Math.max(tallest, p.item.height);
  }
  for (const t of trays) t.placements.sort((a, b) => a.y - b.y || a.x - b.x);
  return {
    furnace: f.id,
    profile,
    trays,
    mass_g: run.mass,
    tallest_mm: tallest,
    area_used_fraction: footprintArea / (f.tray_count * f.tray_mm[0] * f.tray_mm[1]),
  };
}

export function packTrays(input: TrayPackInput, options: PackTraysOptions = {}): TrayPackResult {
  return packTraysReported(input, options).result;
}

/** packTrays with an account of the search (for the batching board's progress and the bench). */
export function packTraysReported(input: TrayPackInput, options: PackTraysOptions = {}): { result: TrayPackResult; search: PackSearchReport } {
  const clock = options.clock ?? (() => Date.now());
  const t0 = clock();
  const model = buildTrayModel(input);
  const restarts = options.restarts ?? 0;
  const all: { run: TrayRun; firstDue: number; minRank: number }[] = [];
  const search = options.search === false ? null : (options.search ?? {});
  const nUnits = model.profiles.reduce((s, pm) => s + pm.items.length, 0);
  // Without a deadline the work budget is what bounds the time; with one and no work given, the
  // search gets about the work our machine does in the deadline (searchWorkFor).
  const defaultWork = search?.deadlineMs !== undefined ? searchWorkFor(nUnits, search.deadlineMs) : defaultSearchWork(nUnits);
  const totalWork = search ? (search.work ?? Math.round(defaultWork)) : 0;
  const deadline = search?.deadlineMs !== undefined ? t0 + search.deadlineMs : undefined;
  const report: PackSearchReport = { start_runs: 0, work: 0, stop: search ? "bound" : "off", ms: 0 };
  // Constructions first, for every profile; the search's work then goes to the profiles still
  // above their bound, split by unit count (a profile already at its bound needs none).
  const solved = model.profiles.map((pm) => solveProfile(pm, { restarts }));
  // Before searching for a plan with fewer runs, look for proof that there is none.
  if (search) {
    model.profiles.forEach((pm, k) => {
      if (solved[k].length > pm.bound.largest) raiseBySharing(model, pm, solved[k].length);
    });
  }
  const above = model.profiles.filter((pm, k) => solved[k].length > pm.bound.largest);
  const unitsAbove = above.reduce((s, pm) => s + pm.items.length, 0);
  model.profiles.forEach((pm, k) => {
    let runs = solved[k];
    report.start_runs += runs.length;
    if (search && runs.length > pm.bound.largest) {
      const found = reduceRuns(pm, runs, {
        seed: (search.seed ?? 1) ^ hashString(pm.profile),
        work: Math.round((totalWork * pm.items.length) / Math.max(1, unitsAbove)),
        deadline,
        clock,
      });
      report.work += found.work;
      if (found.stop === "time") report.stop = "time";
      else if (found.stop !== "bound" && report.stop === "bound") report.stop = "budget";
      // Fewer runs only; the constructions' plan also orders urgent units better.
      if (found.runs.length < runs.length) runs = orderByDue(found.runs);
    }
    for (const r of runs) {
      all.push({
        run: toTrayRun(r, pm.profile, model.clearance),
        firstDue: Math.min(...r.placed.map((p) => p.item.due)),
        minRank: Math.min(...r.placed.map((p) => p.item.dueRank)),
      });
    }
  });
  // Interleave profiles by their most urgent unit; within a profile the solver's order stands.
  all.sort((a, b) => a.firstDue - b.firstDue || (a.run.profile < b.run.profile ? -1 : a.run.profile > b.run.profile ? 1 : a.minRank - b.minRank));
  report.ms = clock() - t0;
  return { result: { runs: all.map((x) => x.run), unplaced: model.unplaced, lowerBound: model.lowerBound }, search: report };
}

/** FNV-1a, so that each profile's search has its own stream for one seed. */
function hashString(s: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) h = Math.imul(h ^ s.charCodeAt(i), 0x01000193);
  return h >>> 0;
}

export type CanAddResult =
  | { ok: true; run: TrayRun; repacked: boolean }
  | { ok: false; code: "profile" | "height" | "load" | "room"; reason: string };

export interface CanAddContext {
  furnace: PackFurnace;
  clearance_mm: number;
  /** The units already in the run (for their footprints, heights and masses). */
  units: readonly PackUnit[];
}

function itemFor(u: PackUnit, f: FurnaceModel, clearance: number, local: number): ItemModel {
  const [pw, ph] = grownSize(u, clearance);
  return {
    idx: local,
    local,
    unit: u,
    pw,
    ph,
    area: pw * ph,
    mass: u.mass_g,
    height: u.height_mm,
    due: parseDue(u.due, u.id),
    dueRank: local,
    eligible: [f.idx],
    eligibleMask: new Set([f.idx]),
    size: pw * ph,
    sizeSum: pw * ph,
  };
}

/**
 * Whether `unit` can join `run` (for the batching board). Keeps the current layout and looks for
 * room beside it first; failing that, re-packs the whole run. Returns the new layout when it fits.
 */
export function canAddToRun(run: TrayRun, unit: PackUnit, ctx: CanAddContext): CanAddResult {
  validateClearance(ctx.clearance_mm);
  validateFurnace(ctx.furnace);
  validateUnit(unit);
  const f = furnaceModel(ctx.furnace, 0, ctx.clearance_mm);
  const c = ctx.clearance_mm;
  if (run.furnace !== ctx.furnace.id) {
    throw new ComputationError(`run is on furnace ${run.furnace}, context gives ${ctx.furnace.id}`, "furnace");
  }
  if (unit.profile !== run.profile) {
    return { ok: false, code: "profile", reason: `unit needs profile ${unit.profile}; this run is ${run.profile}` };
  }
  if (!ctx.furnace.profiles.includes(unit.profile)) {
    return { ok: false, code: "profile", reason: `furnace ${ctx.furnace.id} does not run profile ${unit.profile}` };
  }
  if (unit.height_mm > f.height + GEOMETRY_EPS) {
    return { ok: false, code: "height", reason: `${unit.height_mm} mm tall; the furnace allows ${f.height} mm` };
  }
  const byId = new Map(ctx.units.map((u) => [u.id, u]));
  const placedUnits: PackUnit[] = [];
  for (const t of run.trays) for (const p of t.placements) {
    const u = byId.get(p.unit);
    if (!u) throw new ComputationError(`unit ${p.unit} of the run is missing from the context`, "units");
    placedUnits.push(u);
  }
  const mass = placedUnits.reduce((s, u) => s + u.mass_g, 0);
  if (mass + unit.mass_g > f.load * (1 + 1e-12)) {
    return {
      ok: false,
      code: "load",
      reason: `run would weigh ${(mass + unit.mass_g).toFixed(0)} g; the furnace allows ${f.load} g`,
    };
  }
  const item = itemFor(unit, f, c, placedUnits.length);
  if (!fitsTray(item.pw, item.ph, f)) {
    return { ok: false, code: "room", reason: "footprint with clearance is larger than a tray" };
  }
  const items = placedUnits.map((u, i) => itemFor(u, f, c, i));
  const minSide = Math.min(item.pw, item.ph, ...items.map((it) => Math.min(it.pw, it.ph)));

  // Rebuild the free space around the present layout.
  const state = new RunState(
    f,
    minSide,
    Array.from({ length: f.trays }, () => new MaxRectsBin(f.W, f.D, minSide)),
  );
  let k = 0;
  for (const t of run.trays) {
    if (t.placements.length > 0 && !(Number.isInteger(t.index) && t.index >= 0 && t.index < f.trays)) {
      throw new ComputationError(`run uses tray ${t.index}, furnace ${f.furnace.id} has ${f.trays}`, "trays");
    }
    for (const p of t.placements) {
      const it = items[k++];
      const w = p.rotated ? it.ph : it.pw;
      const h = p.rotated ? it.pw : it.ph;
      state.bins[t.index].place({ x: p.x - c, y: p.y - c, w, h });
      state.record(it, t.index, p.x - c, p.y - c, w, h, p.rotated);
    }
  }
  for (const rule of ["short-side", "contact", "bottom-left", "area"] as const) {
    const trial = state.clone();
    if (trial.tryAdd(item, rule, "best")) return { ok: true, run: toTrayRun(trial, run.profile, c), repacked: false };
  }
  const repacked = packSet(f, minSide, [...items, item]);
  if (repacked) return { ok: true, run: toTrayRun(repacked, run.profile, c), repacked: true };
  return { ok: false, code: "room", reason: "no room on the trays, even after re-packing the run" };
}
