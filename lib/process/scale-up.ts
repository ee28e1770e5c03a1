import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";

// Sinter shrinkage and the scale-up of a finished part to its printed ("green") size.
// Shrinkage s is linear and defined on the green dimension: s = (L_green − L_sintered)/L_green,
// so L_green = L_sintered/(1 − s) and the scale-up factor is f = 1/(1 − s)
// (German & Bose, Injection Molding of Metals and Ceramics, MPIF 1997; ASM Handbook Vol. 7).

/** Bound-metal parts shrink roughly 12–21 % linear; outside (0, 0.5) the input is a mistake. */
export const MIN_SHRINKAGE_EXCLUSIVE = 0;
export const MAX_SHRINKAGE_EXCLUSIVE = 0.5;

export const shrinkageSchema = z
  .number()
  .gt(MIN_SHRINKAGE_EXCLUSIVE, "shrinkage must be greater than 0")
  .lt(MAX_SHRINKAGE_EXCLUSIVE, "shrinkage must be below 0.5 (a fraction, not a percentage)");

const lengthSchema = z.number().positive();
const stockSchema = z.number().nonnegative();

export const axesSchema = z.object({ x: lengthSchema, y: lengthSchema, z: lengthSchema });
export type Axes = z.infer<typeof axesSchema>;

export const faceStockSchema = z.object({
  x_neg: stockSchema.default(0),
  x_pos: stockSchema.default(0),
  y_neg: stockSchema.default(0),
  y_pos: stockSchema.default(0),
  z_neg: stockSchema.default(0),
  z_pos: stockSchema.default(0),
});
export type FaceStock = z.infer<typeof faceStockSchema>;

/** Z is the build (layer) direction; X and Y share one in-plane shrinkage. */
export const axisShrinkageSchema = z.object({ xy: shrinkageSchema, z: shrinkageSchema });
export type AxisShrinkage = z.infer<typeof axisShrinkageSchema>;

export const scaleUpInputSchema = z.object({
  nominal: axesSchema,
  stock: faceStockSchema.default({ x_neg: 0, x_pos: 0, y_neg: 0, y_pos: 0, z_neg: 0, z_pos: 0 }),
  shrink: axisShrinkageSchema,
});
export type ScaleUpInput = z.input<typeof scaleUpInputSchema>;

export type AxisScale = {
  /** Finished size, mm. */
  nominal: number;
  /** Finished size plus the stock on both faces of this axis: the as-sintered target, mm. */
  withStock: number;
  /** Printed size, mm. */
  green: number;
  factor: number;
  shrinkage: number;
};
export type ScaleUpResult = { x: AxisScale; y: AxisScale; z: AxisScale; unit: "mm" };

function checkShrinkage(s: number, field = "shrinkage"): number {
  const parsed = shrinkageSchema.safeParse(s);
  if (!parsed.success) {
    throw new ComputationError(`${field}: ${parsed.error.issues[0].message} (got ${s})`, field);
  }
  return s;
}

export function scaleFactor(shrinkage: number): number {
  return 1 / (1 - checkShrinkage(shrinkage));
}

export function shrinkageFromFactor(factor: number): number {
  if (!Number.isFinite(factor) || factor <= 1 || factor >= 2) {
    throw new ComputationError(`a scale-up factor must lie between 1 and 2 (got ${factor})`, "factor");
  }
  return 1 - 1 / factor;
}

/** Green (printed) length from the as-sintered length. */
export function greenFromSintered(sinteredMm: number, shrinkage: number): number {
  if (!(sinteredMm > 0) || !Number.isFinite(sinteredMm)) {
    throw new ComputationError(`a length must be greater than 0 (got ${sinteredMm})`, "sinteredMm");
  }
  return sinteredMm / (1 - checkShrinkage(shrinkage));
}

/** As-sintered length from the green length (the inverse of greenFromSintered). */
export function sinteredFromGreen(greenMm: number, shrinkage: number): number {
  if (!(greenMm > 0) || !Number.isFinite(greenMm)) {
    throw new ComputationError(`a length must be greater than 0 (got ${greenMm})`, "greenMm");
  }
  return greenMm * (1 - checkShrinkage(shrinkage));
}

/**
 * s = 1 − (φ/f_s)^(1/3): isotropic shrinkage with mass conserved and the binder fully removed.
 * φ is the solids loading (powder volume fraction of the feedstock, equal to the fractional
 * green density of the powder skeleton); f_s the fractional sintered density.
 * German & Bose 1997 (MPIF); ASM Handbook Vol. 7, metal powder injection molding.
 */
export function shrinkageFromSolidsLoading(phi: number, fs: number): number {
  if (!(phi > 0 && phi < 1)) throw new ComputationError(`solids loading φ must lie in (0, 1) (got ${phi})`, "phi");
  if (!(fs > 0 && fs <= 1)) {
    throw new ComputationError(`fractional sintered density f_s must lie in (0, 1] (got ${fs})`, "fs");
  }
  if (phi >= fs) {
    throw new ComputationError(
      `solids loading ${phi} is not below the sintered density fraction ${fs}: the part would not shrink`,
      "phi",
    );
  }
  return checkShrinkage(1 - Math.cbrt(phi / fs));
}

export type DensityContext = {
  /** Powder volume fraction of the feedstock. */
  solidsLoading: number;
  /** Density of the fully dense alloy, g/cm³. */
  theoreticalDensity: number;
  /** Binder density, g/cm³; lets the check recognise a feedstock density by its value. */
  binderDensity?: number;
};

/**
 * s = 1 − (ρ_skeleton/ρ_sintered)^(1/3). The green density here is the density of the
 * powder skeleton alone (φ·ρ_theoretical), NOT the bulk density of the printed part with its
 * binder: passing the feedstock density understates shrinkage (17-4 PH, φ 0.60: 12.5 %
 * instead of 14.8 %). Give `context` to have that mistake caught.
 */
export function shrinkageFromDensities(
  rhoPowderSkeletonGreen: number,
  rhoSintered: number,
  context?: DensityContext,
): number {
  if (!(rhoPowderSkeletonGreen > 0) || !Number.isFinite(rhoPowderSkeletonGreen)) {
    throw new ComputationError("the green skeleton density must be greater than 0", "rhoPowderSkeletonGreen");
  }
  if (!(rhoSintered > 0) || !Number.isFinite(rhoSintered)) {
    throw new ComputationError("the sintered density must be greater than 0", "rhoSintered");
  }
  if (context) {
    const { solidsLoading: phi, theoreticalDensity: rhoT, binderDensity } = context;
    const expected = phi * rhoT;
    const relative = Math.abs(rhoPowderSkeletonGreen - expected) / expected;
    if (relative > 0.02) {
      const feedstock = binderDensity !== undefined ? feedstockDensity(phi, rhoT, binderDensity) : undefined;
      const looksLikeFeedstock =
        feedstock !== undefined && Math.abs(rhoPowderSkeletonGreen - feedstock) / feedstock <= 0.02;
      throw new ComputationError(
        looksLikeFeedstock
          ? `${rhoPowderSkeletonGreen} g/cm³ is the feedstock (powder + binder) density; shrinkage needs the ` +
              `powder skeleton density φ·ρ_theoretical = ${expected.toFixed(3)} g/cm³ ` +
              `(use skeletonDensityFromFeedstock)`
          : `green skeleton density ${rhoPowderSkeletonGreen} g/cm³ disagrees with φ·ρ_theoretical = ` +
              `${expected.toFixed(3)} g/cm³`,
        "rhoPowderSkeletonGreen",
        { expectedSkeleton: expected, feedstock },
      );
    }
    if (rhoSintered > rhoT * 1.000001) {
      throw new ComputationError("the sintered density exceeds the theoretical density", "rhoSintered");
    }
  }
  if (rhoPowderSkeletonGreen >= rhoSintered) {
    throw new ComputationError(
      "the green skeleton density is not below the sintered density: the part would not shrink",
      "rhoPowderSkeletonGreen",
    );
  }
  return checkShrinkage(1 - Math.cbrt(rhoPowderSkeletonGreen / rhoSintered));
}

/** Bulk density of feedstock (powder + binder, no porosity): φ·ρ_T + (1 − φ)·ρ_binder. */
export function feedstockDensity(phi: number, rhoTheoretical: number, rhoBinder: number): number {
  if (!(phi > 0 && phi < 1)) throw new ComputationError(`solids loading must lie in (0, 1) (got ${phi})`, "phi");
  if (!(rhoTheoretical > 0) || !(rhoBinder > 0) || !Number.isFinite(rhoTheoretical) || !Number.isFinite(rhoBinder)) {
    throw new ComputationError("densities must be greater than 0", "density");
  }
  return phi * rhoTheoretical + (1 - phi) * rhoBinder;
}

/**
 * The powder skeleton density hidden in a feedstock density: ρ_feed − (1 − φ)·ρ_binder.
 * This is the value shrinkageFromDensities expects.
 */
export function skeletonDensityFromFeedstock(rhoFeedstock: number, phi: number, rhoBinder: number): number {
  if (!(phi > 0 && phi < 1)) throw new ComputationError(`solids loading must lie in (0, 1) (got ${phi})`, "phi");
  if (!(rhoFeedstock > 0) || !(rhoBinder > 0) || !Number.isFinite(rhoFeedstock) || !Number.isFinite(rhoBinder)) {
    throw new ComputationError("densities must be greater than 0", "density");
  }
  const skeleton = rhoFeedstock - (1 - phi) * rhoBinder;
  if (!(skeleton > 0)) {
    throw new ComputationError(
      `feedstock density ${rhoFeedstock} g/cm³ is too low for φ = ${phi} with binder at ${rhoBinder} g/cm³`,
      "rhoFeedstock",
    );
  }
  return skeleton;
}

/** Theoretical (full) density implied by a feedstock density: (ρ_feed − (1 − φ)ρ_b)/φ. */
export function theoreticalDensityFromFeedstock(rhoFeedstock: number, phi: number, rhoBinder: number): number {
  return skeletonDensityFromFeedstock(rhoFeedstock, phi, rhoBinder) / phi;
}

/** Per-axis scale-up: green = (nominal + stock on the two faces of the axis) × f. */
export function scaleUp(input: ScaleUpInput): ScaleUpResult {
  const { nominal, stock, shrink } = parseInput(scaleUpInputSchema, input, "scale-up");
  const axis = (n: number, neg: number, pos: number, s: number): AxisScale => {
    const withStock = n + neg + pos;
    const factor = 1 / (1 - s);
    return { nominal: n, withStock, green: withStock * factor, factor, shrinkage: s };
  };
  return {
    x: axis(nominal.x, stock.x_neg, stock.x_pos, shrink.xy),
    y: axis(nominal.y, stock.y_neg, stock.y_pos, shrink.xy),
    z: axis(nominal.z, stock.z_neg, stock.z_pos, shrink.z),
    unit: "mm",
  };
}

export const inverseScaleUpInputSchema = z.object({
  green: axesSchema,
  stock: scaleUpInputSchema.shape.stock,
  shrink: axisShrinkageSchema,
});
export type InverseScaleUpInput = z.input<typeof inverseScaleUpInputSchema>;

/** From a green size back to the finished size the stock leaves (the inverse of scaleUp). */
export function inverseScaleUp(input: InverseScaleUpInput): ScaleUpResult {
  const { green, stock, shrink } = parseInput(inverseScaleUpInputSchema, input, "inverse scale-up");
  const axis = (g: number, neg: number, pos: number, s: number, name: string): AxisScale => {
    const withStock = g * (1 - s);
    const n = withStock - neg - pos;
    if (!(n > 0)) {
      throw new ComputationError(
        `${name}: the stock (${neg + pos} mm) exceeds the sintered size ${withStock.toFixed(3)} mm`,
        `green.${name}`,
      );
    }
    return { nominal: n, withStock, green: g, factor: 1 / (1 - s), shrinkage: s };
  };
  return {
    x: axis(green.x, stock.x_neg, stock.x_pos, shrink.xy, "x"),
    y: axis(green.y, stock.y_neg, stock.y_pos, shrink.xy, "y"),
    z: axis(green.z, stock.z_neg, stock.z_pos, shrink.z, "z"),
    unit: "mm",
  };
}

export const fitsBuildVolumeInputSchema = z.object({
  green: axesSchema,
  volume: axesSchema,
  marginMm: z.number().nonnegative(),
});

export type AxisFit = {
  axis: "x" | "y" | "z";
  /** Part extent along this machine axis, mm. */
  needMm: number;
  /** Build-volume extent left after the margin, mm. */
  availableMm: number;
  /** How far the part overruns (positive) or clears (negative) the available extent, mm. */
  overMm: number;
};

export type BuildVolumeFit = {
  fits: boolean;
  /** True when the part's X and Y are swapped (turned 90° about Z) to fit. */
  rotated: boolean;
  axes: AxisFit[];
  /** The axes that overrun, with the amounts: empty when it fits. */
  failing: AxisFit[];
};

/**
 * Does a green part fit a printer's build volume? The margin is kept on every side in X and Y
 * and above the part in Z. X and Y may be swapped (a quarter turn on the plate); Z stays the
 * build direction because the per-axis shrinkage depends on it.
 */
export function fitsBuildVolume(green: Axes, volume: Axes, marginMm: number): BuildVolumeFit {
  const input = parseInput(fitsBuildVolumeInputSchema, { green, volume, marginMm }, "build volume check");
  const available = {
    x: input.volume.x - 2 * input.marginMm,
    y: input.volume.y - 2 * input.marginMm,
    z: input.volume.z - input.marginMm,
  };
  const evaluate = (rotated: boolean): BuildVolumeFit => {
    const need = rotated
      ? { x: input.green.y, y: input.green.x, z: input.green.z }
      : { x: input.green.x, y: input.green.y, z: input.green.z };
    const axes: AxisFit[] = (["x", "y", "z"] as const).map((axis) => ({
      axis,
      needMm: need[axis],
      availableMm: available[axis],
      overMm: need[axis] - available[axis],
    }));
    const failing = axes.filter((a) => a.overMm > 0);
    return { fits: failing.length === 0, rotated, axes, failing };
  };
  const straight = evaluate(false);
  if (straight.fits) return straight;
  const turned = evaluate(true);
  if (turned.fits) return turned;
  const worst = (f: BuildVolumeFit) => Math.max(...f.failing.map((a) => a.overMm));
  return worst(turned) < worst(straight) ? turned : straight;
}

export const materialShrinkageInputSchema = z.object({
  solidsLoading: z.number().gt(0).lt(1),
  sinteredDensity: z.number().positive(),
  theoreticalDensity: z.number().positive(),
});

/** Predicted isotropic shrinkage of a material from its solids loading and densities. */
export function shrinkageFromMaterial(material: z.input<typeof materialShrinkageInputSchema>): number {
  const m = parseInput(materialShrinkageInputSchema, material, "material shrinkage");
  if (m.sinteredDensity > m.theoreticalDensity * 1.000001) {
    throw new ComputationError("the sintered density exceeds the theoretical density", "sinteredDensity");
  }
  return shrinkageFromSolidsLoading(m.solidsLoading, m.sinteredDensity / m.theoreticalDensity);
}
