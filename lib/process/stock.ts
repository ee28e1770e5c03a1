import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";
import { axesSchema, type FaceStock } from "@/lib/process/scale-up";

// Finishing stock advice. Sintered parts vary in size by a fraction of each dimension
// ("as-sintered tolerance usually ±0.3 %", PIM International, design considerations), so the
// stock left on a face to be ground must cover that scatter plus a clean-up cut.

export const stockOptionsSchema = z.object({
  /** Expected as-sintered scatter as a fraction of the dimension (±). */
  scatterFraction: z.number().nonnegative().lt(0.1).default(0.003),
  /** Extra depth so the cut cleans up the sintered skin: 0.1 mm, from memory / common practice. */
  cleanupMm: z.number().nonnegative().default(0.1),
  /** No face gets less than this: 0.2 mm, from memory / common practice (0.1–0.3 mm per side). */
  minimumMm: z.number().nonnegative().default(0.2),
  /** Advice is rounded up to this step so it reads like a drawing value. */
  stepMm: z.number().positive().default(0.05),
});
export type StockOptions = z.input<typeof stockOptionsSchema>;

export type FaceStockAdvice = {
  stockMm: number;
  scatterMm: number;
  cleanupMm: number;
  governedBy: "scatter" | "minimum";
};

/**
 * Stock for one face of a dimension. The whole ± scatter of the dimension is put on the face,
 * because when the opposite face is the datum the entire size error shows up on this one.
 */
export function stockForFace(dimensionMm: number, options: StockOptions = {}): FaceStockAdvice {
  if (!(dimensionMm > 0) || !Number.isFinite(dimensionMm)) {
    throw new ComputationError(`the dimension must be greater than 0 mm (got ${dimensionMm})`, "dimensionMm");
  }
  const o = parseInput(stockOptionsSchema, options, "stock options");
  const scatterMm = o.scatterFraction * dimensionMm;
  const fromScatter = scatterMm + o.cleanupMm;
  const raw = Math.max(fromScatter, o.minimumMm);
  // The small epsilon keeps 0.2 from becoming 0.25 through 0.2/0.05 = 4.000000000000001.
  const stockMm = Math.ceil(raw / o.stepMm - 1e-9) * o.stepMm;
  return {
    stockMm: Number(stockMm.toFixed(6)),
    scatterMm,
    cleanupMm: o.cleanupMm,
    governedBy: fromScatter >= o.minimumMm ? "scatter" : "minimum",
  };
}

export const finishedFacesSchema = z.object({
  x_neg: z.boolean().default(false),
  x_pos: z.boolean().default(false),
  y_neg: z.boolean().default(false),
  y_pos: z.boolean().default(false),
  z_neg: z.boolean().default(false),
  z_pos: z.boolean().default(false),
});

export const stockAdviceInputSchema = z.object({
  nominal: axesSchema,
  finishedFaces: finishedFacesSchema,
  options: stockOptionsSchema.partial().optional(),
});
export type StockAdviceInput = z.input<typeof stockAdviceInputSchema>;

/** Stock per face of a part: faces that are not finished get 0. */
export function stockAdvice(input: StockAdviceInput): { stock: FaceStock; faces: Partial<Record<keyof FaceStock, FaceStockAdvice>> } {
  const { nominal, finishedFaces, options } = parseInput(stockAdviceInputSchema, input, "stock advice");
  const stock: FaceStock = { x_neg: 0, x_pos: 0, y_neg: 0, y_pos: 0, z_neg: 0, z_pos: 0 };
  const faces: Partial<Record<keyof FaceStock, FaceStockAdvice>> = {};
  for (const face of Object.keys(stock) as Array<keyof FaceStock>) {
    if (!finishedFaces[face]) continue;
    const axis = face[0] as "x" | "y" | "z";
    const advice = stockForFace(nominal[axis], options ?? {});
    faces[face] = advice;
    stock[face] = advice.stockMm;
  }
  return { stock, faces };
}

export type RunoutCheck = {
  status: "ok" | "warning";
  /** Radial offset implied by the runout: TIR/2 for an eccentric diameter, mm. */
  eccentricityMm: number;
  requiredPerSideMm: number;
  stockPerSideMm: number;
  /** How much stock per side is missing (0 when ok), mm. */
  shortByMm: number;
  message: string;
};

/**
 * Will a diameter clean up? A diameter running out by TIR is off-centre by TIR/2, so grinding
 * on true centre takes stock − TIR/2 from the low side; that must still exceed the margin.
 * Common practice (no published source); `marginMm` is per side.
 */
export function checkRunoutAgainstStock(runoutTirMm: number, stockPerSideMm: number, marginMm: number): RunoutCheck {
  for (const [field, value] of [
    ["runoutTirMm", runoutTirMm],
    ["stockPerSideMm", stockPerSideMm],
    ["marginMm", marginMm],
  ] as const) {
    if (!Number.isFinite(value) || value < 0) {
      throw new ComputationError(`${field} must be a finite number ≥ 0 (got ${value})`, field);
    }
  }
  const eccentricityMm = runoutTirMm / 2;
  const requiredPerSideMm = eccentricityMm + marginMm;
  const ok = stockPerSideMm > requiredPerSideMm;
  const shortByMm = ok ? 0 : requiredPerSideMm - stockPerSideMm;
  return {
    status: ok ? "ok" : "warning",
    eccentricityMm,
    requiredPerSideMm,
    stockPerSideMm,
    shortByMm,
    message: ok
      ? `stock ${stockPerSideMm.toFixed(3)} mm per side covers runout ${runoutTirMm.toFixed(3)} mm TIR ` +
        `plus ${marginMm.toFixed(3)} mm margin`
      : `runout ${runoutTirMm.toFixed(3)} mm TIR needs more than ${requiredPerSideMm.toFixed(3)} mm per side; ` +
        `${stockPerSideMm.toFixed(3)} mm is ${shortByMm.toFixed(3)} mm short: the diameter may not clean up`,
  };
}
