import { ComputationError } from "@/lib/errors";
import { MaxRectsBin, PLACEMENT_RULES, type PlacementRule } from "@/lib/packing/rectangles";

// Build-plate layout: every green footprint, grown by half the clearance on each side, goes
// onto one plate through the maximal-rectangles packer of lib/packing (rotation about Z
// allowed, since Z is the build direction). The margin to the plate's edge is the clearance too.
// Tried with each placement rule, largest pieces first; the first rule that places everything
// wins, otherwise the one that places the most area.

export type PlateItem = { id: string; x_mm: number; y_mm: number; z_mm: number; label?: string };
export type PlatePlacement = { id: string; x_mm: number; y_mm: number; w_mm: number; h_mm: number; rotated: boolean; z_mm: number; label?: string };
export type PlateLayout = {
  plate_x_mm: number;
  plate_y_mm: number;
  clearance_mm: number;
  placements: PlatePlacement[];
  unplaced: { id: string; reason: string }[];
  /** Share of the usable plate area covered by footprints (without clearance). */
  fill: number;
  tallest_mm: number;
  rule: PlacementRule | null;
};

export function layoutPlate(items: PlateItem[], plate: { x_mm: number; y_mm: number }, clearanceMm: number): PlateLayout {
  if (!(plate.x_mm > 0 && plate.y_mm > 0)) throw new ComputationError("the plate must have a positive size", "plate");
  if (!(clearanceMm >= 0) || !Number.isFinite(clearanceMm)) throw new ComputationError("the clearance must be ≥ 0 mm", "clearance_mm");
  for (const it of items) {
    if (!(it.x_mm > 0 && it.y_mm > 0 && it.z_mm > 0) || ![it.x_mm, it.y_mm, it.z_mm].every(Number.isFinite)) {
      throw new ComputationError(`item ${it.id} needs a positive green size`, "items");
    }
  }
  const c = clearanceMm;
  // The plate shrinks by half a clearance at each edge so that grown pieces keep a full
  // clearance to the edge and to each other.
  const usableW = plate.x_mm - c;
  const usableH = plate.y_mm - c;
  const sorted = [...items].sort((a, b) => b.x_mm * b.y_mm - a.x_mm * a.y_mm || a.id.localeCompare(b.id));
  let best: { placements: PlatePlacement[]; unplaced: PlateLayout["unplaced"]; area: number; rule: PlacementRule } | null = null;
  for (const rule of PLACEMENT_RULES) {
    const bin = new MaxRectsBin(Math.max(usableW, 0), Math.max(usableH, 0));
    const placements: PlatePlacement[] = [];
    const unplaced: PlateLayout["unplaced"] = [];
    let area = 0;
    for (const it of sorted) {
      const w = it.x_mm + c;
      const h = it.y_mm + c;
      const fit = bin.find(w, h, rule, true);
      if (!fit) {
        const fitsAlone = (w <= usableW && h <= usableH) || (h <= usableW && w <= usableH);
        unplaced.push({ id: it.id, reason: fitsAlone ? "no room left on the plate" : `its ${it.x_mm.toFixed(1)} × ${it.y_mm.toFixed(1)} mm footprint does not fit the ${plate.x_mm} × ${plate.y_mm} mm plate` });
        continue;
      }
      bin.place(fit);
      area += it.x_mm * it.y_mm;
      placements.push({
        id: it.id,
        label: it.label,
        // back to plate coordinates: the footprint itself, without the grown margin
        x_mm: fit.x + c,
        y_mm: fit.y + c,
        w_mm: fit.rotated ? it.y_mm : it.x_mm,
        h_mm: fit.rotated ? it.x_mm : it.y_mm,
        rotated: fit.rotated,
        z_mm: it.z_mm,
      });
    }
    if (!best || unplaced.length < best.unplaced.length || (unplaced.length === best.unplaced.length && area > best.area)) {
      best = { placements, unplaced, area, rule };
    }
    if (unplaced.length === 0) break;
  }
  const usableArea = Math.max(usableW, 0) * Math.max(usableH, 0);
  return {
    plate_x_mm: plate.x_mm,
    plate_y_mm: plate.y_mm,
    clearance_mm: c,
    placements: best?.placements ?? [],
    unplaced: best?.unplaced ?? [],
    fill: usableArea > 0 && best ? best.area / usableArea : 0,
    tallest_mm: best?.placements.reduce((m, p) => Math.max(m, p.z_mm), 0) ?? 0,
    rule: items.length ? (best?.rule ?? null) : null,
  };
}
