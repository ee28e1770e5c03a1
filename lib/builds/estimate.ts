import { buildPrintMinutes } from "@/lib/process/print-time";
import { layoutPlate, type PlateItem, type PlateLayout } from "./plate";

// What a build needs from a printer, and what one printer makes of a build: does the
// material run there, does the plate take every green footprint, is the tallest part under
// the gantry, and how long will it print. Pure; the route handlers and the floor share it.

export type BuildUnitSpec = {
  unit_id: string;
  serial: string;
  material_id: string;
  green_x_mm: number;
  green_y_mm: number;
  green_z_mm: number;
  /** Printed (green) volume, mm³. */
  green_volume_mm3: number;
};

export type PrinterSpec = {
  id: string;
  name: string;
  build_x_mm: number;
  build_y_mm: number;
  build_z_mm: number;
  deposition_cm3_per_h: number;
  layer_height_mm: number;
  layer_overhead_s: number;
  material_ids: string[];
  active: boolean;
};

export type PrinterVerdict = {
  printer_id: string;
  printer_name: string;
  ok: boolean;
  /** Why not, in words a technician reads on the floor. */
  reason: string | null;
  est_minutes: number | null;
  layout: PlateLayout | null;
};

/** Green volume of a part from its finished volume, grown by the scale-up of each axis. */
export function greenVolumeMm3(part: {
  volume_mm3: number | null;
  nominal_x_mm: number;
  nominal_y_mm: number;
  nominal_z_mm: number;
  green_x_mm: number;
  green_y_mm: number;
  green_z_mm: number;
}): { volume_mm3: number; estimated: boolean } {
  const grow = (part.green_x_mm / part.nominal_x_mm) * (part.green_y_mm / part.nominal_y_mm) * (part.green_z_mm / part.nominal_z_mm);
  if (part.volume_mm3 && part.volume_mm3 > 0) return { volume_mm3: part.volume_mm3 * grow, estimated: false };
  // Without geometry: half the bounding box, a middling fill for machined-looking parts.
  return { volume_mm3: 0.5 * part.green_x_mm * part.green_y_mm * part.green_z_mm, estimated: true };
}

export function judgePrinter(units: BuildUnitSpec[], materialId: string, printer: PrinterSpec, clearanceMm: number): PrinterVerdict {
  const base = { printer_id: printer.id, printer_name: printer.name };
  if (!printer.active) return { ...base, ok: false, reason: `${printer.name} is out of service`, est_minutes: null, layout: null };
  if (!printer.material_ids.includes(materialId)) {
    return { ...base, ok: false, reason: `${printer.name} is not set up for this build's material`, est_minutes: null, layout: null };
  }
  if (units.length === 0) return { ...base, ok: false, reason: "the build has no units", est_minutes: null, layout: null };
  const tallest = Math.max(...units.map((u) => u.green_z_mm));
  if (tallest + clearanceMm > printer.build_z_mm) {
    return {
      ...base,
      ok: false,
      reason: `the tallest green part (${tallest.toFixed(1)} mm) does not clear ${printer.name}'s ${printer.build_z_mm} mm build height`,
      est_minutes: null,
      layout: null,
    };
  }
  const items: PlateItem[] = units.map((u) => ({ id: u.unit_id, label: u.serial, x_mm: u.green_x_mm, y_mm: u.green_y_mm, z_mm: u.green_z_mm }));
  const layout = layoutPlate(items, { x_mm: printer.build_x_mm, y_mm: printer.build_y_mm, z_mm: printer.build_z_mm }, clearanceMm);
  if (layout.unplaced.length) {
    const first = layout.unplaced[0];
    return {
      ...base,
      ok: false,
      reason: `${layout.unplaced.length} of ${units.length} unit(s) do not fit ${printer.name}'s ${printer.build_x_mm} × ${printer.build_y_mm} mm plate (${first.reason})`,
      est_minutes: null,
      layout,
    };
  }
  const time = buildPrintMinutes({
    printer: { depositionCm3PerH: printer.deposition_cm3_per_h, layerHeightMm: printer.layer_height_mm, layerOverheadS: printer.layer_overhead_s },
    parts: units.map((u) => ({ greenVolumeMm3: u.green_volume_mm3, heightMm: u.green_z_mm })),
  });
  // Bookings are kept to whole minutes so the floor's edges line up.
  return { ...base, ok: true, reason: null, est_minutes: Math.ceil(time.totalMinutes), layout };
}

export function judgePrinters(units: BuildUnitSpec[], materialId: string, printers: PrinterSpec[], clearanceMm: number): PrinterVerdict[] {
  return printers.map((p) => judgePrinter(units, materialId, p, clearanceMm));
}
