// Builds furnace runs for one sinter profile. Runs are filled one at a time from all waiting units
// (for one tray and one resource that is First Fit Decreasing, with Dósa's 11/9·OPT + 6/9 bound),
// on the furnace where the run takes the most work. Several constructions are tried (orderings
// with maxrects rules, a dot-product vector-packing rule, and tray-by-tray filling that first
// looks for a waste-free tray), each followed by emptying the weakest run into the others where
// they have room; the fewest runs win, and the search stops once a construction meets the lower
// bound. A due-date-first construction always runs too and wins ties on the run count, so urgent
// units go into the first runs.

import { GEOMETRY_EPS, MaxRectsBin, type PlacementRule } from "./rectangles";
import { buildBlocks, singleBlock, turnBlock, type Block } from "./blocks";
import { fillTrayExactly, type TilePlacement } from "./tile-search";
import { FIT_TOLERANCE_MM, type FurnaceModel, type ItemModel, type ProfileModel } from "./tray-model";
import { mulberry32 } from "@/lib/random";

export interface PlacedItem {
  item: ItemModel;
  tray: number;
  x: number;
  y: number;
  w: number;
  h: number;
  rotated: boolean;
}

export type TrayChoice = "first" | "best";

export class RunState {
  bins: MaxRectsBin[];
  placed: PlacedItem[] = [];
  /** Built on first use: the search clones runs far more often than it asks who is in them. */
  private memberSet: Set<ItemModel> | null = null;
  mass = 0;
  value = 0;
  area = 0;

  constructor(
    readonly f: FurnaceModel,
    readonly minSide: number,
    bins?: MaxRectsBin[],
  ) {
    this.bins = bins ?? Array.from({ length: f.trays }, () => new MaxRectsBin(f.W, f.D, minSide));
  }

  clone(): RunState {
    const r = new RunState(
      this.f,
      this.minSide,
      this.bins.map((b) => b.clone()),
    );
    r.placed = [...this.placed];
    r.mass = this.mass;
    r.value = this.value;
    r.area = this.area;
    return r;
  }

  get members(): ReadonlySet<ItemModel> {
    this.memberSet ??= new Set(this.placed.map((p) => p.item));
    return this.memberSet;
  }

  massFits(it: ItemModel): boolean {
    return this.mass + it.mass <= this.f.load * (1 + 1e-12);
  }

  tryAdd(it: ItemModel, rule: PlacementRule, trays: TrayChoice): boolean {
    if (!it.eligibleMask.has(this.f.idx) || !this.massFits(it)) return false;
    if (it.area > this.f.runArea - this.area + GEOMETRY_EPS) return false;
    let bestT = -1;
    let best: ReturnType<MaxRectsBin["find"]> = null;
    for (let t = 0; t < this.bins.length; t++) {
      const bin = this.bins[t];
      if (it.area > bin.freeArea + GEOMETRY_EPS) continue;
      const fit = bin.find(it.pw, it.ph, rule, true);
      if (!fit) continue;
      if (trays === "first") {
        bestT = t;
        best = fit;
        break;
      }
      if (best === null || fit.s1 < best.s1 - GEOMETRY_EPS || (fit.s1 <= best.s1 + GEOMETRY_EPS && fit.s2 < best.s2)) {
        bestT = t;
        best = fit;
      }
    }
    if (best === null) return false;
    this.bins[bestT].place(best);
    this.record(it, bestT, best.x, best.y, best.w, best.h, best.rotated);
    return true;
  }

  record(it: ItemModel, tray: number, x: number, y: number, w: number, h: number, rotated: boolean): void {
    this.placed.push({ item: it, tray, x, y, w, h, rotated });
    this.memberSet?.add(it);
    this.mass += it.mass;
    this.value += it.size;
    this.area += it.area;
  }
}

export type OrderKey = "area" | "long-side" | "perimeter" | "size" | "sum" | "short-side" | "mass" | "due";

const ORDER_KEYS: readonly OrderKey[] = ["area", "long-side", "perimeter", "size", "sum", "short-side", "mass", "due"];

function keyOf(it: ItemModel, key: OrderKey): [number, number] {
  switch (key) {
    case "area":
      return [it.area, Math.max(it.pw, it.ph)];
    case "long-side":
      return [Math.max(it.pw, it.ph), Math.min(it.pw, it.ph)];
    case "perimeter":
      return [it.pw + it.ph, it.area];
    case "size":
      return [it.size, it.area];
    case "sum":
      return [it.sizeSum, it.area];
    case "short-side":
      return [Math.min(it.pw, it.ph), Math.max(it.pw, it.ph)];
    case "mass":
      return [it.mass, it.area];
    case "due":
      return [-it.dueRank, 0];
  }
}

/** Decreasing by key, ties by due date so that equal pieces keep their urgency order. */
export function sortItems(items: readonly ItemModel[], key: OrderKey): ItemModel[] {
  const keyed = items.map((it) => ({ it, k: keyOf(it, key) }));
  keyed.sort((a, b) => b.k[0] - a.k[0] || b.k[1] - a.k[1] || a.it.dueRank - b.it.dueRank);
  return keyed.map((x) => x.it);
}

export type Orders = Record<OrderKey, ItemModel[]>;

export function computeOrders(items: readonly ItemModel[]): Orders {
  const o = {} as Orders;
  for (const k of ORDER_KEYS) o[k] = sortItems(items, k);
  return o;
}

/** Area-decreasing order with each key scaled by a random factor in [1−spread, 1]. */
export function perturbedOrder(items: readonly ItemModel[], seed: number, spread: number): ItemModel[] {
  const rnd = mulberry32(seed);
  const keyed = items.map((it) => ({ it, k: it.area * (1 - spread * rnd()) }));
  keyed.sort((a, b) => b.k - a.k || a.it.dueRank - b.it.dueRank);
  return keyed.map((x) => x.it);
}

export type ConstructConfig =
  | { kind: "pass"; order: ItemModel[]; rule: PlacementRule; trays: TrayChoice }
  | { kind: "dot"; rule: PlacementRule }
  | { kind: "tray"; attempts: { order: ItemModel[]; rule: PlacementRule }[]; exact?: ExactSearch };

/** Shared across one construction: per furnace, the exact search is dropped once it has failed. */
export interface ExactSearch {
  workBudget: number;
  disabled: Set<number>;
  /** Blocks per furnace and joining mode, built once and reused while their units stay free. */
  blocks: Map<string, Block[]>;
}

function passFill(run: RunState, order: readonly ItemModel[], used: Uint8Array, rule: PlacementRule, trays: TrayChoice): RunState {
  for (const it of order) {
    if (used[it.local] || run.members.has(it)) continue;
    run.tryAdd(it, rule, trays);
  }
  return run;
}

/**
 * A waste-free filling of one tray from `free`, first from building blocks, then from the single
 * pieces; placements in packing coordinates with tolerance-shrunk sizes, or null.
 */
function exactTray(f: FurnaceModel, free: readonly ItemModel[], massLeft: number, exact: ExactSearch): PlacedItem[] | null {
  const tol = FIT_TOLERANCE_MM;
  const attempt = (blocks: Block[], share: number) =>
    fillTrayExactly(
      f.W,
      f.D,
      blocks.map((b) => ({ w: b.w, h: b.h, mass: b.mass, ref: b })),
      { tol, massLeft, workBudget: exact.workBudget * share },
    ).placements;
  const singles = free.map((it) => singleBlock(it, tol));
  // Blocks built once per construction; a block that lost a unit to a tray is dropped.
  const freeSet = new Set(free);
  const blocksOf = (mode: "greedy" | "unique"): Block[] => {
    const key = `${f.idx}:${mode}`;
    let built = exact.blocks.get(key);
    if (!built) {
      built = buildBlocks(free, f.W, f.D, tol, 0.003, tol, mode);
      exact.blocks.set(key, built);
    }
    const blocks = built.filter((b) => b.parts.every((p) => freeSet.has(p.item)));
    const inBlocks = new Set(blocks.flatMap((b) => b.parts.map((p) => p.item)));
    for (const it of free) if (!inBlocks.has(it)) blocks.push(singleBlock(it, tol));
    return blocks;
  };
  // Greedy joins rebuild the most; joins without guessing are the fallback; single pieces last,
  // each with a smaller share of the budget (most waste-free trays are found at the first step).
  let tiling: TilePlacement<Block>[] | null = null;
  for (const [mode, share] of [
    ["greedy", 1],
    ["unique", 0.5],
  ] as const) {
    const blocks = blocksOf(mode);
    if (blocks.length < singles.length) tiling = attempt(blocks, share);
    if (tiling) break;
  }
  tiling ??= attempt(singles, 0.3);
  if (!tiling) return null;
  const out: PlacedItem[] = [];
  for (const p of tiling) {
    const b = p.rotated ? turnBlock(p.ref) : p.ref;
    for (const part of b.parts) {
      out.push({
        item: part.item,
        tray: 0,
        x: p.x + part.dx,
        y: p.y + part.dy,
        w: part.w - tol,
        h: part.h - tol,
        rotated: part.rotated,
      });
    }
  }
  return out;
}

/** Fills the trays one at a time, each with the best of several single-tray passes. */
function trayBestOfFill(
  f: FurnaceModel,
  minSide: number,
  used: Uint8Array,
  attempts: { order: ItemModel[]; rule: PlacementRule }[],
  exact: ExactSearch | undefined,
): RunState {
  const run = new RunState(f, minSide);
  for (let t = 0; t < f.trays; t++) {
    if (exact && !exact.disabled.has(f.idx)) {
      const free = attempts[0].order.filter(
        (it) => !used[it.local] && !run.members.has(it) && it.eligibleMask.has(f.idx),
      );
      const tiling = exactTray(f, free, f.load - run.mass, exact);
      if (tiling) {
        const bin = new MaxRectsBin(f.W, f.D, minSide);
        for (const p of tiling) {
          bin.place({ x: p.x, y: p.y, w: p.w, h: p.h });
          run.record(p.item, t, p.x, p.y, p.w, p.h, p.rotated);
        }
        run.bins[t] = bin;
        continue;
      }
      exact.disabled.add(f.idx);
    }
    let bestBin: MaxRectsBin | null = null;
    let bestPlaced: PlacedItem[] = [];
    let bestValue = 0;
    for (const att of attempts) {
      const bin = new MaxRectsBin(f.W, f.D, minSide);
      let massLeft = f.load * (1 + 1e-12) - run.mass;
      const placed: PlacedItem[] = [];
      let value = 0;
      for (const it of att.order) {
        if (used[it.local] || run.members.has(it) || !it.eligibleMask.has(f.idx)) continue;
        if (it.mass > massLeft || it.area > bin.freeArea + GEOMETRY_EPS) continue;
        const fit = bin.find(it.pw, it.ph, att.rule, true);
        if (!fit) continue;
        bin.place(fit);
        placed.push({ item: it, tray: t, x: fit.x, y: fit.y, w: fit.w, h: fit.h, rotated: fit.rotated });
        massLeft -= it.mass;
        value += it.size;
      }
      if (value > bestValue + 1e-12) {
        bestValue = value;
        bestBin = bin;
        bestPlaced = placed;
      }
    }
    if (bestBin === null) break;
    run.bins[t] = bestBin;
    for (const p of bestPlaced) run.record(p.item, p.tray, p.x, p.y, p.w, p.h, p.rotated);
  }
  return run;
}

/**
 * Vector-packing greedy: keeps adding the unit whose (area, mass) shares best match what the run
 * has left (largest dot product), after the "DotProduct" rule of Panigrahy, Talwar, Uyeda and
 * Wieder, "Heuristics for Vector Bin Packing" (Microsoft Research, 2011) [from memory].
 */
function dotProductFill(f: FurnaceModel, pm: ProfileModel, used: Uint8Array, rule: PlacementRule): RunState {
  const run = new RunState(f, pm.minSide);
  const cands = pm.items.filter((it) => !used[it.local] && it.eligibleMask.has(f.idx));
  // Free space only shrinks and the load only grows, so a unit that fails once stays out.
  const alive = new Uint8Array(cands.length).fill(1);
  for (;;) {
    const ra = 1 - run.area / f.runArea;
    const rm = 1 - run.mass / f.load;
    let best = -1;
    let bestScore = Number.NEGATIVE_INFINITY;
    for (let i = 0; i < cands.length; i++) {
      if (!alive[i]) continue;
      const it = cands[i];
      if (!run.massFits(it) || it.area > f.runArea - run.area + GEOMETRY_EPS) {
        alive[i] = 0;
        continue;
      }
      const score = (it.area / f.runArea) * ra + (it.mass / f.load) * rm;
      if (score > bestScore || (score === bestScore && it.dueRank < cands[best].dueRank)) {
        best = i;
        bestScore = score;
      }
    }
    if (best < 0) break;
    alive[best] = 0;
    run.tryAdd(cands[best], rule, "first");
  }
  return run;
}

function fillRun(f: FurnaceModel, pm: ProfileModel, used: Uint8Array, cfg: ConstructConfig): RunState {
  if (cfg.kind === "pass") return passFill(new RunState(f, pm.minSide), cfg.order, used, cfg.rule, cfg.trays);
  if (cfg.kind === "dot") return dotProductFill(f, pm, used, cfg.rule);
  return trayBestOfFill(f, pm.minSide, used, cfg.attempts, cfg.exact);
}

/** Picks the run that removes the most work (normalised size); ties go to the smaller furnace. */
function bestOf(runs: RunState[]): RunState | null {
  let best: RunState | null = null;
  for (const r of runs) {
    if (r.placed.length === 0) continue;
    if (
      best === null ||
      r.value > best.value + 1e-12 ||
      (Math.abs(r.value - best.value) <= 1e-12 && r.f.runArea < best.f.runArea)
    ) {
      best = r;
    }
  }
  return best;
}

export function construct(pm: ProfileModel, cfg: ConstructConfig): RunState[] {
  const used = new Uint8Array(pm.items.length);
  let remaining = pm.items.length;
  const runs: RunState[] = [];
  while (remaining > 0) {
    const best = bestOf(pm.furnaces.map((f) => fillRun(f, pm, used, cfg)));
    if (best === null) throw new Error("internal: no furnace takes a unit that was found eligible");
    for (const p of best.placed) used[p.item.local] = 1;
    remaining -= best.placed.length;
    runs.push(best);
  }
  return runs;
}

const SET_ORDERS: readonly OrderKey[] = ["area", "long-side", "size", "perimeter", "short-side", "mass"];
const SET_RULES: readonly PlacementRule[] = ["short-side", "contact", "area", "bottom-left", "long-side"];

/** Packs all of `items` into one run of `f`, trying several orderings and rules; null if none works. */
export function packSet(
  f: FurnaceModel,
  minSide: number,
  items: readonly ItemModel[],
  effort: "quick" | "full" = "full",
): RunState | null {
  let mass = 0;
  let area = 0;
  for (const it of items) {
    if (!it.eligibleMask.has(f.idx)) return null;
    mass += it.mass;
    area += it.area;
  }
  if (mass > f.load * (1 + 1e-12) || area > f.runArea + GEOMETRY_EPS) return null;
  const orders = effort === "quick" ? SET_ORDERS.slice(0, 2) : SET_ORDERS;
  const rules = effort === "quick" ? SET_RULES.slice(0, 2) : SET_RULES;
  const trayChoices: TrayChoice[] = f.trays > 1 ? ["first", "best"] : ["first"];
  for (const key of orders) {
    const order = sortItems(items, key);
    for (const rule of rules) {
      for (const trays of trayChoices) {
        const run = new RunState(f, minSide);
        let ok = true;
        for (const it of order) {
          if (!run.tryAdd(it, rule, trays)) {
            ok = false;
            break;
          }
        }
        if (ok) return run;
      }
    }
  }
  return null;
}

/** Where `it` would go in `run` without changing it, or null. */
function findSpot(run: RunState, it: ItemModel): { tray: number; fit: NonNullable<ReturnType<MaxRectsBin["find"]>> } | null {
  if (!it.eligibleMask.has(run.f.idx) || !run.massFits(it)) return null;
  if (it.area > run.f.runArea - run.area + GEOMETRY_EPS) return null;
  // Whether a piece fits does not depend on the rule (rules only rank the free rectangles that
  // take it), so the first rule decides.
  for (let t = 0; t < run.bins.length; t++) {
    if (it.area > run.bins[t].freeArea + GEOMETRY_EPS) continue;
    const fit = run.bins[t].find(it.pw, it.ph, "short-side", true);
    if (fit) return { tray: t, fit };
  }
  return null;
}

/** Moves every unit of `weak` into the other runs, or returns null if one does not find room. */
function redistribute(pm: ProfileModel, weak: RunState, others: RunState[]): RunState[] | null {
  let freeMass = 0;
  let freeArea = 0;
  for (const q of others) {
    freeMass += q.f.load - q.mass;
    freeArea += q.f.runArea - q.area;
  }
  if (weak.mass > freeMass * (1 + 1e-12) || weak.area > freeArea + GEOMETRY_EPS) return null;
  const modified = new Map<RunState, RunState>();
  const cur = (q: RunState) => modified.get(q) ?? q;
  const items = sortItems(
    weak.placed.map((p) => p.item),
    "size",
  );
  for (const it of items) {
    const targets = others
      .filter((q) => {
        const c = cur(q);
        return it.eligibleMask.has(q.f.idx) && c.massFits(it) && c.area + it.area <= q.f.runArea + GEOMETRY_EPS;
      })
      .sort((x, y) => y.f.runArea - cur(y).area - (x.f.runArea - cur(x).area));
    let ok = false;
    for (const q of targets) {
      const spot = findSpot(cur(q), it);
      if (spot) {
        const c = cur(q).clone();
        c.bins[spot.tray].place(spot.fit);
        c.record(it, spot.tray, spot.fit.x, spot.fit.y, spot.fit.w, spot.fit.h, spot.fit.rotated);
        modified.set(q, c);
        ok = true;
        break;
      }
    }
    if (!ok) {
      for (const q of targets.slice(0, 2)) {
        const repacked = packSet(q.f, pm.minSide, [...cur(q).placed.map((p) => p.item), it], "quick");
        if (repacked) {
          modified.set(q, repacked);
          ok = true;
          break;
        }
      }
    }
    if (!ok) return null;
  }
  return others.map(cur);
}

/** Repeatedly empties one of the weakest runs into the rest while the count is above the bound. */
export function eliminateRuns(pm: ProfileModel, runs: RunState[], tries = 3): RunState[] {
  let current = runs;
  let improved = true;
  while (improved && current.length > pm.bound.largest) {
    improved = false;
    const weakest = [...current].sort((a, b) => a.value - b.value).slice(0, tries);
    for (const weak of weakest) {
      const next = redistribute(
        pm,
        weak,
        current.filter((r) => r !== weak),
      );
      if (next) {
        current = next;
        improved = true;
        break;
      }
    }
  }
  return current;
}

/**
 * Due-date-first construction: each run takes the longest prefix of the most urgent waiting units
 * that packs, then fills what room is left with any waiting units, largest first.
 */
export function constructDueFirst(pm: ProfileModel, orders: Orders): RunState[] {
  const used = new Uint8Array(pm.items.length);
  let remaining = pm.items.length;
  const runs: RunState[] = [];
  while (remaining > 0) {
    const waiting = orders.due.filter((it) => !used[it.local]);
    const candidates: { run: RunState; prefix: number }[] = [];
    for (const f of pm.furnaces) {
      const elig = waiting.filter((it) => it.eligibleMask.has(f.idx));
      if (elig.length === 0) continue;
      let hi = 0;
      let mass = 0;
      let area = 0;
      while (hi < elig.length) {
        mass += elig[hi].mass;
        area += elig[hi].area;
        if (mass > f.load * (1 + 1e-12) || area > f.runArea + GEOMETRY_EPS) break;
        hi++;
      }
      let lo = 1;
      let best = packSet(f, pm.minSide, elig.slice(0, 1), "quick");
      if (best === null) continue;
      while (lo < hi) {
        const mid = (lo + hi + 1) >> 1;
        const r = packSet(f, pm.minSide, elig.slice(0, mid), "quick");
        if (r) {
          lo = mid;
          best = r;
        } else {
          hi = mid - 1;
        }
      }
      passFill(best, orders.size, used, "short-side", "best");
      candidates.push({ run: best, prefix: lo });
    }
    if (candidates.length === 0) throw new Error("internal: no furnace takes a unit that was found eligible");
    // The most urgent waiting unit must be in this run; then the longest urgent prefix, then fill.
    const head = waiting[0];
    candidates.sort(
      (a, b) =>
        Number(b.run.members.has(head)) - Number(a.run.members.has(head)) ||
        b.prefix - a.prefix ||
        b.run.value - a.run.value,
    );
    const chosen = candidates[0].run;
    for (const p of chosen.placed) used[p.item.local] = 1;
    remaining -= chosen.placed.length;
    runs.push(chosen);
  }
  return runs;
}

/** Runs in order of their most urgent unit. */
export function orderByDue(runs: RunState[]): RunState[] {
  const minRank = (r: RunState) => Math.min(...r.placed.map((p) => p.item.dueRank));
  return [...runs].sort((a, b) => minRank(a) - minRank(b) || b.value - a.value);
}

/** Σ (n − due rank) × run position: lower means urgent units sit in earlier runs. */
export function dueScore(runs: RunState[], n: number): number {
  let s = 0;
  runs.forEach((r, k) => {
    for (const p of r.placed) s += (n - p.item.dueRank) * k;
  });
  return s;
}

export interface SolveOptions {
  /** Extra perturbed restarts after the fixed configurations (0 = none). */
  restarts: number;
  /** Work budget of the exact tray search per tray (0 = off). */
  exactWorkBudget?: number;
}

/**
 * Cheap constructions first; stop as soon as one meets the lower bound. The due-date-first
 * construction always runs, since it decides the order among equal run counts.
 */
export function solveProfile(pm: ProfileModel, options: SolveOptions): RunState[] {
  const orders = computeOrders(pm.items);
  const n = pm.items.length;
  const exactBudget = options.exactWorkBudget ?? 150_000;
  // Measured on generated mixes and zero-waste sets: after the due-date-first construction only
  // the tray-by-tray one ever wins outright (the waste-free trays); the passes add variety.
  const configs: ConstructConfig[] = [
    {
      kind: "tray",
      exact: exactBudget > 0 ? { workBudget: exactBudget, disabled: new Set(), blocks: new Map() } : undefined,
      attempts: [
        { order: orders.area, rule: "short-side" },
        { order: orders.area, rule: "contact" },
        { order: orders["long-side"], rule: "short-side" },
        { order: orders["long-side"], rule: "bottom-left" },
        { order: orders.perimeter, rule: "area" },
        { order: orders.size, rule: "short-side" },
      ],
    },
    { kind: "dot", rule: "short-side" },
    { kind: "pass", order: orders.size, rule: "short-side", trays: "first" },
    { kind: "pass", order: orders.sum, rule: "contact", trays: "first" },
    { kind: "pass", order: orders["long-side"], rule: "short-side", trays: "best" },
  ];
  for (let k = 0; k < options.restarts; k++) {
    const order = perturbedOrder(pm.items, 0x9e3779b9 ^ (k * 7919), 0.3);
    configs.push({ kind: "pass", order, rule: k % 2 === 0 ? "short-side" : "contact", trays: "first" });
  }
  let best: RunState[] | null = null;
  let bestScore = Infinity;
  const consider = (runs: RunState[]) => {
    const ordered = orderByDue(runs);
    const score = dueScore(ordered, n);
    if (best === null || ordered.length < best.length || (ordered.length === best.length && score < bestScore)) {
      best = ordered;
      bestScore = score;
    }
  };
  const atBound = () => best !== null && (best as RunState[]).length <= pm.bound.largest;
  consider(eliminateRuns(pm, constructDueFirst(pm, orders)));
  for (const cfg of configs) {
    if (atBound()) break;
    const runs = construct(pm, cfg);
    // Emptying a run is the expensive step: only try it where it could beat the best so far.
    consider(best !== null && runs.length - 1 >= (best as RunState[]).length ? runs : eliminateRuns(pm, runs));
  }
  return best as unknown as RunState[];
}
