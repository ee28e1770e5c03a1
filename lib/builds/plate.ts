import { ComputationError } from "@/lib/errors";
import { packPlate } from "@/lib/packing/plate";

// A build's plate layout in the shape the build page, the traveler and the stored
// builds.plate_layout use, packed by lib/packing/plate (the tray solver on a one-tray "run":
// clearance between parts and to the plate's edge, a quarter turn about Z allowed, since Z is
// the build direction). Labels and heights ride along for the drawings.

export type PlateItem = { id: string; x_mm: number; y_mm: number; z_mm: number; label?: string; due?: string | null };
export type PlatePlacement = { id: string; x_mm: number; y_mm: number; w_mm: number; h_mm: number; rotated: boolean; z_mm: number; label?: string };
export type PlateLayout = {
  plate_x_mm: number;
  plate_y_mm: number;
  clearance_mm: number;
  placements: PlatePlacement[];
  unplaced: { id: string; reason: string }[];
  /** Share of the plate covered by footprints (without clearance). */
  fill: number;
  tallest_mm: number;
  /** Plates the units would need (1 when they all fit) and a bound no layout beats. */
  plates_needed: number;
  lower_bound_plates: number;
};

export function layoutPlate(items: PlateItem[], plate: { x_mm: number; y_mm: number; z_mm?: number }, clearanceMm: number): PlateLayout {
  if (!(plate.x_mm > 0 && plate.y_mm > 0)) throw new ComputationError("the plate must have a positive size", "plate");
  if (!(clearanceMm >= 0) || !Number.isFinite(clearanceMm)) throw new ComputationError("the clearance must be ≥ 0 mm", "clearance_mm");
  for (const it of items) {
    if (!(it.x_mm > 0 && it.y_mm > 0 && it.z_mm > 0) || ![it.x_mm, it.y_mm, it.z_mm].every(Number.isFinite)) {
      throw new ComputationError(`item ${it.id} needs a positive green size`, "items");
    }
  }
  const byId = new Map(items.map((i) => [i.id, i]));
  // Height is judged by the caller against the build volume; here it only must not refuse.
  const z = plate.z_mm ?? Math.max(1, ...items.map((i) => i.z_mm));
  const packed = packPlate(
    items.map((i) => ({ id: i.id, footprint_mm: [i.x_mm, i.y_mm] as const, height_mm: i.z_mm, due: i.due ?? null })),
    { id: "plate", build_volume_mm: [plate.x_mm, plate.y_mm, z] },
    clearanceMm,
  );
  const placements: PlatePlacement[] = packed.placements.map((p) => {
    const it = byId.get(p.unit)!;
    return { id: p.unit, label: it.label, x_mm: p.x, y_mm: p.y, w_mm: p.w, h_mm: p.d, rotated: p.rotated, z_mm: it.z_mm };
  });
  return {
    plate_x_mm: plate.x_mm,
    plate_y_mm: plate.y_mm,
    clearance_mm: clearanceMm,
    placements,
    unplaced: packed.unplaced.map((u) => ({ id: u.unit, reason: u.reason })),
    fill: packed.area_used_fraction,
    tallest_mm: placements.reduce((m, p) => Math.max(m, p.z_mm), 0),
    plates_needed: packed.plates_needed,
    lower_bound_plates: packed.lower_bound_plates,
  };
}
