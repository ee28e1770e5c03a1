// How much feedstock a build takes from the shelf. The parts' green mass is their printed
// volume times the feedstock's bulk density (powder and binder together, ρ = φ·ρ_metal +
// (1 − φ)·ρ_binder, see feedstockDensity in lib/process/scale-up.ts); supports and raft are an
// allowance on that mass, and purging the nozzle before a build costs a fixed amount. Both
// allowances are the shop's own figures per material: common practice (no published source).

export type DrawUnit = { green_volume_mm3: number };
export type DrawMaterial = { feedstock_density_g_cm3: number; support_allowance: number; purge_g: number };
export type DrawEstimate = { parts_g: number; supports_g: number; purge_g: number; total_g: number };

/** Feedstock masses are kept to 0.1 g: a lab balance for spools reads no finer. */
export const roundGrams = (g: number) => Math.round(g * 10) / 10;

export function estimateDraw(units: DrawUnit[], material: DrawMaterial): DrawEstimate {
  return estimateDrawOfTotal(units.reduce((sum, u) => sum + Math.max(0, u.green_volume_mm3), 0), units.length, material);
}

/** The same from the units' summed green volume and their count (a schedule's builds, counted per part). */
export function estimateDrawOfTotal(greenVolumeMm3: number, unitCount: number, material: DrawMaterial): DrawEstimate {
  if (!(material.feedstock_density_g_cm3 > 0)) throw new RangeError("the feedstock density must be greater than 0 g/cm³");
  if (!(material.support_allowance >= 0) || !(material.purge_g >= 0)) throw new RangeError("allowances cannot be negative");
  const parts = (Math.max(0, greenVolumeMm3) / 1000) * material.feedstock_density_g_cm3;
  const supports = parts * material.support_allowance;
  const purge = unitCount > 0 ? material.purge_g : 0;
  return { parts_g: roundGrams(parts), supports_g: roundGrams(supports), purge_g: roundGrams(purge), total_g: roundGrams(parts + supports + purge) };
}
