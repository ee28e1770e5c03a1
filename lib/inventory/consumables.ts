// The wash bath and the furnace's process gas.
//
// A solvent bath takes up the binder it dissolves; the more it holds, the slower and less
// completely it washes, so a shop changes the bath when the dissolved binder reaches a limit it
// sets from the solvent maker's data or its own trials: common practice (no published source).
// The binder dissolved per unit is its measured mass loss in the wash (green − brown mass).

export type BathUnit = { green_mass_g: number | null; brown_mass_g: number | null };
export type BathState = { dissolved_g: number; limit_g: number; saturation: number; due: boolean; measured_units: number; unmeasured_units: number };

/** Change-out is due at this share of the limit, so the next batch does not run in a spent bath. */
export const BATH_DUE_AT = 0.9;

export function bathState(units: BathUnit[], limit_g: number): BathState {
  let dissolved = 0, measured = 0, unmeasured = 0;
  for (const u of units) {
    if (u.green_mass_g !== null && u.brown_mass_g !== null && u.green_mass_g >= u.brown_mass_g) {
      dissolved += u.green_mass_g - u.brown_mass_g;
      measured += 1;
    } else unmeasured += 1;
  }
  const saturation = limit_g > 0 ? dissolved / limit_g : 0;
  return { dissolved_g: Math.round(dissolved * 10) / 10, limit_g, saturation: Math.round(saturation * 1000) / 1000, due: saturation >= BATH_DUE_AT, measured_units: measured, unmeasured_units: unmeasured };
}

// Process gas: a run of a profile uses its flow for the whole cycle (purge, heating, holds and
// cooling under gas); a flow-metered estimate, not a measurement.
export type GasRun = { id: string; code: string; gas: string; flow_l_per_min: number; cycle_minutes: number; starts_at: string };
export type GasWarning = { run_id: string; code: string; gas: string; needed_l: number; left_before_l: number };

export const runGasLitres = (r: Pick<GasRun, "flow_l_per_min" | "cycle_minutes">) => Math.round(r.flow_l_per_min * r.cycle_minutes * 10) / 10;

/** Runs, in start order, that would find too little gas left after the runs before them. */
export function gasShortfalls(runs: GasRun[], onHand: Record<string, number>): GasWarning[] {
  const left = { ...onHand };
  const out: GasWarning[] = [];
  for (const r of [...runs].sort((a, b) => a.starts_at.localeCompare(b.starts_at))) {
    if (!r.gas || !(r.flow_l_per_min > 0)) continue;
    const need = runGasLitres(r);
    const have = left[r.gas] ?? 0;
    if (need > have) out.push({ run_id: r.id, code: r.code, gas: r.gas, needed_l: need, left_before_l: Math.round(have * 10) / 10 });
    left[r.gas] = have - need;
  }
  return out;
}
