// Turns a tray-packing input into the rectangles the packer works on, decides which units fit
// which furnace (or why none), and computes the lower bounds.
//
// Clearance model. A unit's footprint [w, d] must keep c from every other unit and from the
// tray's edges. Grow each footprint by c towards the origin only, to [x−c, x+w]×[y−c, y+d]:
// two grown rectangles are disjoint exactly when the footprints are at least c apart, and a
// grown rectangle stays inside [0, W−c]×[0, D−c] exactly when the footprint keeps c from all four
// edges. So the packer places (w+c)×(d+c) rectangles into a (W−c)×(D−c) tray: n units in a row
// need n·(w+c) + c of tray, one extra c along each edge.
//
// Fit tolerance. Footprints are measurements rounded to some 0.001 mm, and pieces cut from a
// full tray (zero clearance) can add up to a hair more than the tray. Every grown rectangle is
// therefore packed FIT_TOLERANCE_MM smaller than its nominal size; a checker allows footprints to
// overlap, or to cross the clearance line, by that much and no more.

import { ComputationError } from "@/lib/errors";
import { claimedAreaTrayBound, dffTrayBound, shortSideTrayBound } from "./dual-feasible";
import { sharingTrayBound } from "./subset-bound";
import { ceilWithSlack, martelloTothL2 } from "./one-dimensional";
import { GEOMETRY_EPS } from "./rectangles";
import type { PackFurnace, PackUnit, TrayLowerBound, TrayPackInput, Unplaced } from "./types";

export const FIT_TOLERANCE_MM = 0.01;

export interface FurnaceModel {
  idx: number;
  furnace: PackFurnace;
  /** Packing area: tray minus one clearance in each direction. */
  W: number;
  D: number;
  trays: number;
  load: number;
  height: number;
  /** trays × W × D */
  runArea: number;
}

export interface ItemModel {
  idx: number;
  /** Position within its profile's item list. */
  local: number;
  unit: PackUnit;
  /** Grown and tolerance-shrunk size that the packer places. */
  pw: number;
  ph: number;
  area: number;
  mass: number;
  height: number;
  /** ms since epoch; +Infinity when the unit has no due date. */
  due: number;
  /** 0 = most urgent within its profile. */
  dueRank: number;
  /** Indices of furnaces that take this unit on their own (profile, height, footprint, load). */
  eligible: number[];
  eligibleMask: Set<number>;
  /** max(area / best run area, mass / best load) within its profile. */
  size: number;
  /** area / best run area + mass / best load. */
  sizeSum: number;
}

export interface ProfileModel {
  profile: string;
  items: ItemModel[];
  furnaces: FurnaceModel[];
  maxRunArea: number;
  maxLoad: number;
  maxTrays: number;
  minSide: number;
  /** The one tray size (W×D) of every furnace the profile may use, or null when they differ. */
  oneTray: { W: number; D: number } | null;
  bound: { area: number; mass: number; count: number; shape: number; sharing: number; largest: number };
}

export interface TrayModel {
  clearance: number;
  furnaces: FurnaceModel[];
  profiles: ProfileModel[];
  unplaced: Unplaced[];
  lowerBound: TrayLowerBound;
}

function positive(value: number, field: string): void {
  if (!(value > 0) || !Number.isFinite(value)) {
    throw new ComputationError(`${field} must be a positive finite number, got ${value}`, field);
  }
}

export function parseDue(due: string | null | undefined, unitId: string): number {
  if (due === undefined || due === null) return Number.POSITIVE_INFINITY;
  const t = Date.parse(due);
  if (Number.isNaN(t)) throw new ComputationError(`Unit ${unitId} has an unreadable due date "${due}"`, "due");
  return t;
}

export function validateFurnace(f: PackFurnace): void {
  positive(f.tray_mm[0], `furnace ${f.id} tray_mm[0]`);
  positive(f.tray_mm[1], `furnace ${f.id} tray_mm[1]`);
  positive(f.usable_height_mm, `furnace ${f.id} usable_height_mm`);
  positive(f.max_load_g, `furnace ${f.id} max_load_g`);
  if (!Number.isInteger(f.tray_count) || f.tray_count < 1) {
    throw new ComputationError(`furnace ${f.id} tray_count must be a whole number ≥ 1`, "tray_count");
  }
}

export function validateUnit(u: PackUnit): void {
  positive(u.footprint_mm[0], `unit ${u.id} footprint_mm[0]`);
  positive(u.footprint_mm[1], `unit ${u.id} footprint_mm[1]`);
  positive(u.height_mm, `unit ${u.id} height_mm`);
  if (!(u.mass_g >= 0) || !Number.isFinite(u.mass_g)) {
    throw new ComputationError(`unit ${u.id} mass_g must be a finite number ≥ 0`, "mass_g");
  }
}

export function validateClearance(c: number): void {
  if (!(c >= 0) || !Number.isFinite(c)) {
    throw new ComputationError(`clearance_mm must be a finite number ≥ 0, got ${c}`, "clearance_mm");
  }
}

export function furnaceModel(f: PackFurnace, idx: number, clearance: number): FurnaceModel {
  const W = f.tray_mm[0] - clearance;
  const D = f.tray_mm[1] - clearance;
  return {
    idx,
    furnace: f,
    W,
    D,
    trays: f.tray_count,
    load: f.max_load_g,
    height: f.usable_height_mm,
    runArea: W > 0 && D > 0 ? f.tray_count * W * D : 0,
  };
}

export function grownSize(u: PackUnit, clearance: number): [number, number] {
  return [
    u.footprint_mm[0] + clearance - FIT_TOLERANCE_MM,
    u.footprint_mm[1] + clearance - FIT_TOLERANCE_MM,
  ];
}

export function fitsTray(pw: number, ph: number, f: FurnaceModel): boolean {
  if (f.W <= 0 || f.D <= 0) return false;
  const eps = GEOMETRY_EPS;
  return (pw <= f.W + eps && ph <= f.D + eps) || (ph <= f.W + eps && pw <= f.D + eps);
}

/** Cannot share a tray with another such unit: over half the tray both ways in every fitting orientation. */
export function isBigOnTray(pw: number, ph: number, f: FurnaceModel): boolean {
  const eps = GEOMETRY_EPS;
  let fitsAny = false;
  for (const [a, b] of [
    [pw, ph],
    [ph, pw],
  ] as const) {
    if (a > f.W + eps || b > f.D + eps) continue;
    fitsAny = true;
    if (!(a > f.W / 2 + eps && b > f.D / 2 + eps)) return false;
  }
  return fitsAny;
}

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toFixed(1);
}

function unplacedReason(u: PackUnit, pw: number, ph: number, furnaces: FurnaceModel[]): Unplaced {
  const takers = furnaces.filter((f) => f.furnace.profiles.includes(u.profile));
  if (takers.length === 0) {
    return { unit: u.id, code: "no_profile", reason: `no furnace accepts sinter profile ${u.profile}` };
  }
  const tall = takers.filter((f) => u.height_mm <= f.height + GEOMETRY_EPS);
  if (tall.length === 0) {
    const best = Math.max(...takers.map((f) => f.height));
    return {
      unit: u.id,
      code: "too_tall",
      reason: `${fmt(u.height_mm)} mm tall; furnaces for ${u.profile} allow at most ${fmt(best)} mm`,
    };
  }
  const wide = takers.filter((f) => fitsTray(pw, ph, f));
  if (wide.length === 0) {
    return {
      unit: u.id,
      code: "too_large",
      reason: `footprint ${fmt(u.footprint_mm[0])}×${fmt(u.footprint_mm[1])} mm with clearance fits no tray of a furnace for ${u.profile}`,
    };
  }
  const light = takers.filter((f) => u.mass_g <= f.load);
  if (light.length === 0) {
    const best = Math.max(...takers.map((f) => f.load));
    return {
      unit: u.id,
      code: "too_heavy",
      reason: `${fmt(u.mass_g)} g exceeds the largest load limit (${fmt(best)} g) of furnaces for ${u.profile}`,
    };
  }
  return {
    unit: u.id,
    code: "no_single_furnace",
    reason: `no single furnace for ${u.profile} takes its height, footprint and mass together`,
  };
}

export function buildTrayModel(input: TrayPackInput): TrayModel {
  validateClearance(input.clearance_mm);
  const c = input.clearance_mm;
  const seenF = new Set<string>();
  for (const f of input.furnaces) {
    if (seenF.has(f.id)) throw new ComputationError(`furnace id ${f.id} appears twice`, "furnaces");
    seenF.add(f.id);
    validateFurnace(f);
  }
  const furnaces = input.furnaces.map((f, i) => furnaceModel(f, i, c));
  const seenU = new Set<string>();
  const unplaced: Unplaced[] = [];
  const byProfile = new Map<string, ItemModel[]>();
  input.units.forEach((u, idx) => {
    if (seenU.has(u.id)) throw new ComputationError(`unit id ${u.id} appears twice`, "units");
    seenU.add(u.id);
    validateUnit(u);
    const [pw, ph] = grownSize(u, c);
    const eligible = furnaces
      .filter(
        (f) =>
          f.furnace.profiles.includes(u.profile) &&
          u.height_mm <= f.height + GEOMETRY_EPS &&
          u.mass_g <= f.load &&
          fitsTray(pw, ph, f),
      )
      .map((f) => f.idx);
    if (eligible.length === 0) {
      unplaced.push(unplacedReason(u, pw, ph, furnaces));
      return;
    }
    const item: ItemModel = {
      idx,
      local: 0,
      unit: u,
      pw,
      ph,
      area: pw * ph,
      mass: u.mass_g,
      height: u.height_mm,
      due: parseDue(u.due, u.id),
      dueRank: 0,
      eligible,
      eligibleMask: new Set(eligible),
      size: 0,
      sizeSum: 0,
    };
    const list = byProfile.get(u.profile) ?? [];
    item.local = list.length;
    list.push(item);
    byProfile.set(u.profile, list);
  });

  const profiles: ProfileModel[] = [];
  const total = { area: 0, mass: 0, count: 0, shape: 0, sharing: 0, largest: 0 };
  for (const [profile, items] of [...byProfile.entries()].sort((a, b) => (a[0] < b[0] ? -1 : 1))) {
    const used = new Set<number>();
    for (const it of items) for (const f of it.eligible) used.add(f);
    const pf = furnaces.filter((f) => used.has(f.idx));
    const maxRunArea = Math.max(...pf.map((f) => f.runArea));
    const maxLoad = Math.max(...pf.map((f) => f.load));
    const maxTrays = Math.max(...pf.map((f) => f.trays));
    const sorted = [...items].sort((a, b) => a.due - b.due || (a.unit.id < b.unit.id ? -1 : 1));
    sorted.forEach((it, r) => (it.dueRank = r));
    for (const it of items) {
      it.size = Math.max(it.area / maxRunArea, it.mass / maxLoad);
      it.sizeSum = it.area / maxRunArea + it.mass / maxLoad;
    }
    const minSide = Math.min(...items.map((it) => Math.min(it.pw, it.ph)));

    // Every bound relaxes each run to the best furnace the profile may use, so it stays valid
    // whichever furnaces the runs end up on.
    const area = martelloTothL2(
      items.map((it) => it.area),
      maxRunArea,
    );
    const mass = items.some((it) => it.mass > 0)
      ? martelloTothL2(
          items.map((it) => it.mass),
          maxLoad,
        )
      : 0;
    const big = items.filter((it) => it.eligible.every((fi) => isBigOnTray(it.pw, it.ph, furnaces[fi]))).length;
    const count = big === 0 ? 0 : ceilWithSlack(big / maxTrays);
    // Trays needed by the pieces' shapes (dual-feasible functions, turning allowed), spread over
    // the most trays a run of this profile can have. Bound known to be weak where most pieces are
    // long one way and turning is allowed (the 2-D bin-packing classes VII and VIII: some
    // instances end two trays above it), and on pieces of random sizes (classes III and V); it
    // counts area and claimed strips, not how long and short pieces interlock. raiseBySharing
    // below lifts it where the larger pieces cannot share trays.
    const shapeTrays = dffTrayBound(
      items.map((it) => ({ w: it.pw, h: it.ph, trays: it.eligible.map((fi) => ({ W: furnaces[fi].W, D: furnaces[fi].D })) })),
      items.length <= 200 ? 24 : 8,
    );
    // The short-side bound needs one tray size for the whole profile.
    const t0 = pf[0];
    const oneTray = pf.every((f) => (f.W === t0.W && f.D === t0.D) || (f.W === t0.D && f.D === t0.W)) ? { W: t0.W, D: t0.D } : null;
    const pieces = items.map((it) => ({ w: it.pw, h: it.ph }));
    const sideTrays = oneTray ? shortSideTrayBound(pieces, oneTray.W, oneTray.D) : 0;
    const claimedTrays = oneTray ? claimedAreaTrayBound(pieces, oneTray.W, oneTray.D, items.length <= 200 ? 128 : 32) : 0;
    const trayNeed = Math.max(shapeTrays, sideTrays, claimedTrays);
    const shape = trayNeed === 0 ? 0 : ceilWithSlack(trayNeed / maxTrays);
    const largest = Math.max(area, mass, count, shape, items.length > 0 ? 1 : 0);
    const bound = { area, mass, count, shape, sharing: 0, largest };
    total.area += area;
    total.mass += mass;
    total.count += count;
    total.shape += shape;
    total.largest += largest;
    profiles.push({ profile, items, furnaces: pf, maxRunArea, maxLoad, maxTrays, minSide, oneTray, bound });
  }
  return { clearance: c, furnaces, profiles, unplaced, lowerBound: total };
}

/** Nodes the sharing search may use per profile (about 0.1–0.3 s at most on the 2-D bin-packing classes, on our machine). */
export const SHARING_BUDGET = 10_000;

/**
 * Raises the profile's bound (and the model's totals) by the search over which of the larger
 * pieces can share a tray (subset-bound.ts), up to `stopAt` runs (a plan in hand: no bound can
 * pass it). Costs up to `budget` nodes, so it is run only for a profile whose plan is above its
 * other bounds. Needs one tray size for the whole profile, as the short-side bound does.
 */
export function raiseBySharing(model: TrayModel, pm: ProfileModel, stopAt: number, budget = SHARING_BUDGET): void {
  const tray = pm.oneTray;
  if (!tray) return;
  // From zero: the run bounds may rest on load, which says nothing about trays; the first steps
  // up are settled by area alone, one node each.
  const { bound: trays } = sharingTrayBound(
    pm.items.map((it) => ({ w: it.pw, h: it.ph })),
    tray.W,
    tray.D,
    0,
    { budget, stopAt: stopAt * pm.maxTrays },
  );
  const runs = ceilWithSlack(trays / pm.maxTrays);
  if (runs <= pm.bound.sharing) return;
  model.lowerBound.sharing += runs - pm.bound.sharing;
  pm.bound.sharing = runs;
  if (runs > pm.bound.largest) {
    model.lowerBound.largest += runs - pm.bound.largest;
    pm.bound.largest = runs;
  }
}
