// Build-plate layout: the green footprints of a build's units on one printer's plate (X×Y of the
// build volume), with the same clearance model as the trays (clearance between parts and to the
// plate's edge), heights within the build volume's Z. The plate is packed as a one-tray "run"
// by the tray solver, which puts the most urgent units on the first plate; whatever goes to a
// second plate is reported as not fitting, with the plate count it would take.

import { ComputationError } from "@/lib/errors";
import { orderByDue, solveProfile } from "./run-solver";
import { reduceRuns } from "./run-search";
import { buildTrayModel } from "./tray-model";
import type { PackUnit, TrayPlacement } from "./types";

export interface PlateUnit {
  id: string;
  /** Green footprint [w, d] in mm. */
  footprint_mm: readonly [number, number];
  /** Green height in mm. */
  height_mm: number;
  due?: string | null;
}

export interface PlatePrinter {
  id: string;
  build_volume_mm: readonly [number, number, number];
}

export interface PlateUnplaced {
  unit: string;
  code: "too_tall" | "too_large" | "no_room";
  reason: string;
}

export interface PlateLayout {
  printer: string;
  placements: TrayPlacement[];
  unplaced: PlateUnplaced[];
  /** Σ footprint area / plate area. */
  area_used_fraction: number;
  /** Plates the packer needed for every unit that fits a plate at all. */
  plates_needed: number;
  /** No layout holds those units on fewer plates. */
  lower_bound_plates: number;
}

const PLATE_PROFILE = "plate";

export function packPlate(units: readonly PlateUnit[], printer: PlatePrinter, clearance_mm: number): PlateLayout {
  const [X, Y, Z] = printer.build_volume_mm;
  for (const v of [X, Y, Z]) {
    if (!(v > 0) || !Number.isFinite(v)) throw new ComputationError(`printer ${printer.id} build volume must be positive`, "build_volume_mm");
  }
  const furnace = {
    id: printer.id,
    tray_mm: [X, Y] as const,
    tray_count: 1,
    usable_height_mm: Z,
    max_load_g: Number.MAX_VALUE,
    profiles: [PLATE_PROFILE],
  };
  const asPack: PackUnit[] = units.map((u) => ({
    id: u.id,
    profile: PLATE_PROFILE,
    footprint_mm: u.footprint_mm,
    height_mm: u.height_mm,
    mass_g: 0,
    due: u.due,
  }));
  const model = buildTrayModel({ clearance_mm, furnaces: [furnace], units: asPack });
  const unplaced: PlateUnplaced[] = model.unplaced.map((u) => ({
    unit: u.unit,
    code: u.code === "too_tall" ? "too_tall" : "too_large",
    reason:
      u.code === "too_tall"
        ? `taller than the build volume (${Z} mm)`
        : `footprint with clearance does not fit the ${X}×${Y} mm plate`,
  }));
  const pm = model.profiles[0];
  if (!pm) {
    return { printer: printer.id, placements: [], unplaced, area_used_fraction: 0, plates_needed: 0, lower_bound_plates: 0 };
  }
  let runs = solveProfile(pm, { restarts: 0 });
  // Units left for a second plate: the run-removing search may fit them all on one. A small
  // budget: plates are laid out for every build and printer when the floor checks fits.
  if (runs.length > pm.bound.largest) {
    const found = reduceRuns(pm, runs, { seed: 1, work: Math.min(20_000, 300 * pm.items.length) });
    if (found.runs.length < runs.length) runs = orderByDue(found.runs);
  }
  const first = runs[0];
  const c = model.clearance;
  const placements: TrayPlacement[] = first.placed.map((p) => {
    const [fw, fd] = p.item.unit.footprint_mm;
    return {
      unit: p.item.unit.id,
      x: p.x + c,
      y: p.y + c,
      w: p.rotated ? fd : fw,
      d: p.rotated ? fw : fd,
      rotated: p.rotated,
    };
  });
  placements.sort((a, b) => a.y - b.y || a.x - b.x);
  for (const r of runs.slice(1)) {
    for (const p of r.placed) {
      unplaced.push({
        unit: p.item.unit.id,
        code: "no_room",
        reason: `no room left on the plate; these units need ${runs.length} plates`,
      });
    }
  }
  const area = placements.reduce((s, p) => s + p.w * p.d, 0);
  return {
    printer: printer.id,
    placements,
    unplaced,
    area_used_fraction: area / (X * Y),
    plates_needed: runs.length,
    lower_bound_plates: pm.bound.largest,
  };
}
