import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";

// Print time of an extrusion build: deposited volume over the printer's deposition rate,
// plus a fixed overhead per layer (travel, layer change, wipe). Layers are set by the
// tallest part, because every part on the plate is printed layer by layer together.

export const printerTimingSchema = z.object({
  depositionCm3PerH: z.number().positive(),
  layerHeightMm: z.number().positive(),
  layerOverheadS: z.number().nonnegative(),
});
export type PrinterTiming = z.infer<typeof printerTimingSchema>;

/** Material-side settings: how much of the green volume is actually deposited. */
export const materialPrintSchema = z.object({
  /** Solid fraction of the part's volume (shells plus infill); 1 = fully dense print. */
  solidFraction: z.number().gt(0).max(1).default(1),
  /** A material that prints slower or faster than the printer's rated rate (1 = rated). */
  rateFactor: z.number().positive().default(1),
});
export type MaterialPrint = z.input<typeof materialPrintSchema>;

export const partPrintSchema = z.object({
  greenVolumeMm3: z.number().positive(),
  heightMm: z.number().positive(),
  /** Overrides the material's solid fraction for this part. */
  solidFraction: z.number().gt(0).max(1).optional(),
  quantity: z.number().int().positive().default(1),
});
export type PartPrint = z.input<typeof partPrintSchema>;

export const printTimeInputSchema = z.object({
  printer: printerTimingSchema,
  material: materialPrintSchema.default({ solidFraction: 1, rateFactor: 1 }),
  parts: z.array(partPrintSchema).min(1, "a build needs at least one part"),
});
export type PrintTimeInput = z.input<typeof printTimeInputSchema>;

export type PrintTime = {
  depositedCm3: number;
  depositionMinutes: number;
  layers: number;
  overheadMinutes: number;
  totalMinutes: number;
};

/** Σ deposited volume / rate + layers(tallest part) × per-layer overhead. */
export function buildPrintMinutes(input: PrintTimeInput): PrintTime {
  const { printer, material, parts } = parseInput(printTimeInputSchema, input, "print time");
  let depositedCm3 = 0;
  let tallest = 0;
  for (const part of parts) {
    const solid = part.solidFraction ?? material.solidFraction;
    depositedCm3 += (part.greenVolumeMm3 / 1000) * solid * part.quantity;
    tallest = Math.max(tallest, part.heightMm);
  }
  const rate = printer.depositionCm3PerH * material.rateFactor;
  const depositionMinutes = (depositedCm3 / rate) * 60;
  // A partial top layer is still a layer; the epsilon keeps 30/0.15 = 200.00000000000003 at 200.
  const layers = Math.ceil(tallest / printer.layerHeightMm - 1e-9);
  const overheadMinutes = (layers * printer.layerOverheadS) / 60;
  return {
    depositedCm3,
    depositionMinutes,
    layers,
    overheadMinutes,
    totalMinutes: depositionMinutes + overheadMinutes,
  };
}

/** One part alone on the plate. */
export function printMinutes(
  part: PartPrint,
  printer: PrinterTiming,
  material: MaterialPrint = {},
): PrintTime {
  return buildPrintMinutes({ printer, material, parts: [part] });
}

export const solidFractionInputSchema = z.object({
  volumeMm3: z.number().positive(),
  surfaceAreaMm2: z.number().positive(),
  shellThicknessMm: z.number().nonnegative(),
  infillFraction: z.number().min(0).max(1),
});

/**
 * Solid fraction of a shelled, infilled part, taking the shell as area × thickness (a thin-
 * shell estimate that overcounts at sharp corners; capped at the whole volume).
 */
export function solidFractionFromShell(input: z.input<typeof solidFractionInputSchema>): number {
  const { volumeMm3, surfaceAreaMm2, shellThicknessMm, infillFraction } = parseInput(
    solidFractionInputSchema,
    input,
    "solid fraction",
  );
  const shell = Math.min(volumeMm3, surfaceAreaMm2 * shellThicknessMm);
  const solid = (shell + infillFraction * (volumeMm3 - shell)) / volumeMm3;
  if (!(solid > 0)) {
    throw new ComputationError("a part with no shell and no infill deposits nothing", "infillFraction");
  }
  return solid;
}
