// Shapes shared by the tray and plate packers. Field names follow the planning-instance format
// (snake_case, units in the name) so an instance can be handed to the packer as it is.

export interface PackFurnace {
  id: string;
  /** Tray size [x, y] in mm; trays are stacked, each holds units lying flat. */
  tray_mm: readonly [number, number];
  tray_count: number;
  usable_height_mm: number;
  max_load_g: number;
  /** Sinter profiles this furnace accepts. */
  profiles: readonly string[];
}

export interface PackUnit {
  id: string;
  profile: string;
  /** Green footprint [w, d] in mm as the unit lies on the tray. */
  footprint_mm: readonly [number, number];
  height_mm: number;
  mass_g: number;
  /** ISO 8601; units without a due date go after every dated one. */
  due?: string | null;
}

export interface TrayPlacement {
  unit: string;
  /** Footprint corner nearest the tray origin; the clearance lies outside [x, x+w]×[y, y+d]. */
  x: number;
  y: number;
  /** Size as placed: [w, d] = footprint, or [d, w] when rotated. */
  w: number;
  d: number;
  rotated: boolean;
}

export interface TrayLayout {
  index: number;
  placements: TrayPlacement[];
}

export interface TrayRun {
  furnace: string;
  profile: string;
  trays: TrayLayout[];
  mass_g: number;
  tallest_mm: number;
  /** Σ footprint area / Σ tray area (gross, clearance not counted as used). */
  area_used_fraction: number;
}

export type UnplacedCode = "no_profile" | "too_tall" | "too_large" | "too_heavy" | "no_single_furnace" | "no_room";

export interface Unplaced {
  unit: string;
  code: UnplacedCode;
  reason: string;
}

/**
 * Lower bounds on the run count. `area`, `mass`, `count`, `shape` and `sharing` are each summed
 * over profiles; `largest` sums, profile by profile, the largest of the five, so it is at least
 * each of them and is the bound to compare a result against.
 */
export interface TrayLowerBound {
  /** Martello–Toth L2 on footprint area against the largest run area. */
  area: number;
  /** Martello–Toth L2 on mass against the largest load limit. */
  mass: number;
  /** Pieces over half a tray both ways, which cannot share a tray. */
  count: number;
  /** Trays needed by the pieces' shapes (dual-feasible functions, short-side and claimed-area bounds, turning allowed; dual-feasible.ts). */
  shape: number;
  /**
   * Trays the larger pieces need by a search over which of them can share a tray
   * (subset-bound.ts), tried only for a profile whose constructed plan is above the other bounds
   * and only while a search is asked for; 0 when not tried or proving nothing more.
   */
  sharing: number;
  largest: number;
}

export interface TrayPackResult {
  runs: TrayRun[];
  unplaced: Unplaced[];
  lowerBound: TrayLowerBound;
}

export interface TrayPackInput {
  clearance_mm: number;
  furnaces: readonly PackFurnace[];
  units: readonly PackUnit[];
}
