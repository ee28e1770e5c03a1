// What may go into a wash batch or a furnace run, and how full each one is. Pure: the board runs
// these in the browser to refuse a drop before it lands, and the API runs the same functions
// before it writes, so the two can never disagree.

import { canAddToRun, packTrays } from "@/lib/packing/trays";
import type { PackFurnace, PackUnit, TrayRun } from "@/lib/packing/types";
import { washBatchMinutes } from "@/lib/process/wash";
import type {
  BoardFurnace,
  BoardFurnaceRun,
  BoardProfile,
  BoardStation,
  BoardUnit,
  BoardWashBatch,
  BookingState,
} from "./types";

export const OPEN_STATES: readonly BookingState[] = ["draft", "scheduled"];

export const profileLabel = (p: { code: string; revision: number }) => `${p.code} r${p.revision}`;

const fmt = (x: number, digits = 0) => (Number.isInteger(x) ? String(x) : x.toFixed(digits));

export type Refusal = { ok: false; code: string; reason: string };

// Furnace runs ---------------------------------------------------------------------------------

export function packFurnace(f: BoardFurnace, profiles: readonly BoardProfile[]): PackFurnace {
  const byId = new Map(profiles.map((p) => [p.id, p]));
  return {
    id: f.name,
    tray_mm: [f.tray_x_mm, f.tray_y_mm],
    tray_count: f.tray_count,
    usable_height_mm: f.usable_height_mm,
    max_load_g: f.max_load_g,
    profiles: f.profile_ids.flatMap((id) => {
      const p = byId.get(id);
      return p ? [profileLabel(p)] : [];
    }),
  };
}

/** A unit may join a run whose profile is its material's default or lists its material. */
export function unitTakesProfile(unit: Pick<BoardUnit, "profile_id" | "compatible_profile_ids">, profileId: string): boolean {
  return unit.profile_id === profileId || unit.compatible_profile_ids.includes(profileId);
}

/**
 * The unit as the packer sees it for a run of `runProfile`: it carries the run's profile when
 * it may take it, otherwise its own default, so the packer refuses it by profile.
 */
export function packUnit(unit: BoardUnit, runProfile: BoardProfile | undefined, profiles: readonly BoardProfile[]): PackUnit {
  let profile = "no sinter profile";
  if (runProfile && unitTakesProfile(unit, runProfile.id)) profile = profileLabel(runProfile);
  else {
    const own = profiles.find((p) => p.id === unit.profile_id);
    if (own) profile = profileLabel(own);
  }
  return {
    id: unit.id,
    profile,
    footprint_mm: [unit.green_x_mm, unit.green_y_mm],
    height_mm: unit.green_z_mm,
    mass_g: unit.mass_g,
    due: unit.due_at,
  };
}

export function emptyLayout(furnace: PackFurnace, profile: string): TrayRun {
  return {
    furnace: furnace.id,
    profile,
    trays: Array.from({ length: furnace.tray_count }, (_, index) => ({ index, placements: [] })),
    mass_g: 0,
    tallest_mm: 0,
    area_used_fraction: 0,
  };
}

function layoutUnitIds(layout: TrayRun): string[] {
  return layout.trays.flatMap((t) => t.placements.map((p) => p.unit));
}

/** Recomputes the totals of a layout after placements were taken out. */
export function withTotals(layout: TrayRun, units: readonly PackUnit[], furnace: PackFurnace): TrayRun {
  const byId = new Map(units.map((u) => [u.id, u]));
  let mass = 0;
  let tallest = 0;
  let area = 0;
  for (const id of layoutUnitIds(layout)) {
    const u = byId.get(id);
    if (!u) continue;
    mass += u.mass_g;
    tallest = Math.max(tallest, u.height_mm);
    area += u.footprint_mm[0] * u.footprint_mm[1];
  }
  return {
    ...layout,
    mass_g: mass,
    tallest_mm: tallest,
    area_used_fraction: area / (furnace.tray_count * furnace.tray_mm[0] * furnace.tray_mm[1]),
  };
}

export type LayoutResult = { ok: true; layout: TrayRun; repacked: boolean } | Refusal;

/**
 * The run's tray layout for its present units. The stored layout is kept when it still names
 * exactly these units on a furnace with the same trays; otherwise (another furnace, units moved
 * by someone else) the run is packed afresh, and refused when its units no longer fit one run.
 */
export function currentLayout(
  stored: TrayRun | null,
  units: readonly BoardUnit[],
  furnace: BoardFurnace,
  runProfile: BoardProfile,
  profiles: readonly BoardProfile[],
  clearance: number,
): LayoutResult {
  const pf = packFurnace(furnace, profiles);
  const label = profileLabel(runProfile);
  const packUnits = units.map((u) => packUnit(u, runProfile, profiles));
  if (units.length === 0) return { ok: true, layout: emptyLayout(pf, label), repacked: false };
  if (stored && stored.trays.length === furnace.tray_count) {
    const ids = layoutUnitIds(stored);
    const want = new Set(units.map((u) => u.id));
    if (ids.length === want.size && ids.every((id) => want.has(id))) {
      return { ok: true, layout: withTotals({ ...stored, furnace: pf.id, profile: label }, packUnits, pf), repacked: false };
    }
  }
  const mismatch = packUnits.find((u) => u.profile !== label);
  if (mismatch) {
    const unit = units.find((u) => u.id === mismatch.id)!;
    return { ok: false, code: "profile", reason: `${unit.serial} needs profile ${mismatch.profile}; this run is ${label}` };
  }
  const result = packTrays({ clearance_mm: clearance, furnaces: [pf], units: packUnits });
  if (result.unplaced.length) {
    const u = units.find((x) => x.id === result.unplaced[0].unit)!;
    return { ok: false, code: result.unplaced[0].code, reason: `${u.serial}: ${result.unplaced[0].reason}` };
  }
  if (result.runs.length !== 1) {
    return { ok: false, code: "room", reason: `these ${units.length} units need ${result.runs.length} runs on ${furnace.name}` };
  }
  return { ok: true, layout: result.runs[0], repacked: true };
}

export type AddResult = { ok: true; layout: TrayRun; repacked: boolean } | Refusal;

/** Units that may wait for a furnace: brown, or washing and not failed. */
export function furnaceReady(unit: Pick<BoardUnit, "state" | "wash_passed">): boolean {
  return unit.state === "brown" || (unit.state === "washing" && unit.wash_passed !== false);
}

/** Whether `unit` may join `run`: open run, a unit that is brown or soon brown, one profile, height, load, room. */
export function checkFurnaceAdd(
  run: Pick<BoardFurnaceRun, "state" | "tray_layout" | "profile_id" | "code" | "starts_at">,
  runUnits: readonly BoardUnit[],
  unit: BoardUnit,
  furnace: BoardFurnace,
  profiles: readonly BoardProfile[],
  clearance: number,
): AddResult {
  if (!OPEN_STATES.includes(run.state)) {
    return { ok: false, code: "state", reason: `run ${run.code} is ${run.state}; only draft and scheduled runs take units` };
  }
  if (runUnits.some((u) => u.id === unit.id)) return { ok: false, code: "already", reason: `${unit.serial} is already in ${run.code}` };
  if (!furnaceReady(unit)) {
    return { ok: false, code: "unit_state", reason: `${unit.serial} is ${unit.state.replace(/_/g, " ")}; a furnace run takes brown units` };
  }
  if (run.state === "scheduled" && run.starts_at && unit.ready_at && unit.ready_at > run.starts_at) {
    return { ok: false, code: "timing", reason: `${unit.serial} is still washing and drying until after ${run.code} loads` };
  }
  const runProfile = profiles.find((p) => p.id === run.profile_id);
  if (!runProfile) return { ok: false, code: "profile", reason: `run ${run.code} has an unknown sinter profile` };
  if (!unitTakesProfile(unit, runProfile.id)) {
    const own = profiles.find((p) => p.id === unit.profile_id);
    return {
      ok: false,
      code: "profile",
      reason: `${unit.serial} (${unit.material_code}) needs profile ${own ? profileLabel(own) : "(none set)"}; this run is ${profileLabel(runProfile)}`,
    };
  }
  const current = currentLayout(run.tray_layout, runUnits, furnace, runProfile, profiles, clearance);
  if (!current.ok) return current;
  const pf = packFurnace(furnace, profiles);
  const ctxUnits = runUnits.map((u) => packUnit(u, runProfile, profiles));
  const result = canAddToRun(current.layout, packUnit(unit, runProfile, profiles), { furnace: pf, clearance_mm: clearance, units: ctxUnits });
  if (!result.ok) return { ok: false, code: result.code, reason: `${unit.serial}: ${result.reason}` };
  return { ok: true, layout: result.run, repacked: result.repacked };
}

export function layoutWithout(layout: TrayRun, unitId: string, remaining: readonly BoardUnit[], furnace: BoardFurnace, runProfile: BoardProfile, profiles: readonly BoardProfile[]): TrayRun {
  const pf = packFurnace(furnace, profiles);
  const stripped: TrayRun = { ...layout, trays: layout.trays.map((t) => ({ ...t, placements: t.placements.filter((p) => p.unit !== unitId) })) };
  return withTotals(stripped, remaining.map((u) => packUnit(u, runProfile, profiles)), pf);
}

export type Gauge = { key: string; label: string; used: number; capacity: number; unit: string; fraction: number };

const gauge = (key: string, label: string, used: number, capacity: number, unit: string): Gauge => ({
  key,
  label,
  used,
  capacity,
  unit,
  fraction: capacity > 0 ? used / capacity : 0,
});

export function furnaceGauges(layout: TrayRun | null, units: readonly BoardUnit[], furnace: BoardFurnace): Gauge[] {
  const area = units.reduce((s, u) => s + u.green_x_mm * u.green_y_mm, 0);
  const trayArea = furnace.tray_count * furnace.tray_x_mm * furnace.tray_y_mm;
  const mass = units.reduce((s, u) => s + u.mass_g, 0);
  const tallest = units.reduce((m, u) => Math.max(m, u.green_z_mm), 0);
  const traysUsed = layout ? layout.trays.filter((t) => t.placements.length > 0).length : 0;
  return [
    gauge("area", "Tray area", area / 100, trayArea / 100, "cm²"),
    gauge("load", "Load", mass, furnace.max_load_g, "g"),
    gauge("height", "Tallest part", tallest, furnace.usable_height_mm, "mm"),
    gauge("trays", "Trays in use", traysUsed, furnace.tray_count, ""),
  ];
}

// Wash batches ---------------------------------------------------------------------------------

/**
 * Green parts stand in the basket as they were printed (a green part is weak, and lying it on a
 * side can slump it), turned about Z if that helps.
 */
export function fitsBasket(unit: Pick<BoardUnit, "green_x_mm" | "green_y_mm" | "green_z_mm">, station: BoardStation): boolean {
  const eps = 1e-9;
  if (unit.green_z_mm > station.basket_z_mm + eps) return false;
  const [w, d] = [unit.green_x_mm, unit.green_y_mm];
  return (w <= station.basket_x_mm + eps && d <= station.basket_y_mm + eps) || (d <= station.basket_x_mm + eps && w <= station.basket_y_mm + eps);
}

export type WashAddResult = { ok: true; minutes: number } | Refusal;

export function washMinutesOf(units: readonly BoardUnit[]): number | null {
  if (units.length === 0) return null;
  return washBatchMinutes(
    units.map((u) => ({ thickestWallMm: u.thickest_wall_mm, kMinPerMm2: u.wash_k_min_per_mm2, minMinutes: u.wash_min_minutes })),
  ).minutes;
}

export function checkWashAdd(
  batch: Pick<BoardWashBatch, "state" | "code">,
  batchUnits: readonly BoardUnit[],
  unit: BoardUnit,
  station: BoardStation,
): WashAddResult {
  if (!OPEN_STATES.includes(batch.state)) {
    return { ok: false, code: "state", reason: `wash batch ${batch.code} is ${batch.state}; only draft and scheduled batches take units` };
  }
  if (batchUnits.some((u) => u.id === unit.id)) return { ok: false, code: "already", reason: `${unit.serial} is already in ${batch.code}` };
  if (unit.state !== "green") {
    return { ok: false, code: "unit_state", reason: `${unit.serial} is ${unit.state.replace(/_/g, " ")}; a wash takes green units` };
  }
  if (batchUnits.length + 1 > station.capacity_units) {
    return { ok: false, code: "capacity", reason: `${station.name} holds ${station.capacity_units} units; this batch is full` };
  }
  const mass = batchUnits.reduce((s, u) => s + u.mass_g, 0) + unit.mass_g;
  if (mass > station.max_load_g * (1 + 1e-12)) {
    return { ok: false, code: "load", reason: `batch would weigh ${fmt(mass)} g; ${station.name} takes ${fmt(station.max_load_g)} g` };
  }
  if (!fitsBasket(unit, station)) {
    return {
      ok: false,
      code: "size",
      reason: `${unit.serial} (${fmt(unit.green_x_mm, 1)}×${fmt(unit.green_y_mm, 1)}×${fmt(unit.green_z_mm, 1)} mm, standing) does not fit the ${station.basket_x_mm}×${station.basket_y_mm}×${station.basket_z_mm} mm basket`,
    };
  }
  return { ok: true, minutes: washMinutesOf([...batchUnits, unit])! };
}

export function washGauges(units: readonly BoardUnit[], station: BoardStation): Gauge[] {
  const mass = units.reduce((s, u) => s + u.mass_g, 0);
  const tallest = units.reduce((m, u) => Math.max(m, u.green_z_mm), 0);
  return [
    gauge("capacity", "Basket", units.length, station.capacity_units, "units"),
    gauge("load", "Load", mass, station.max_load_g, "g"),
    gauge("height", "Tallest part", tallest, station.basket_z_mm, "mm"),
  ];
}
