// The cost of one quote line, figure by figure, each with its formula and the inputs it used so
// the person reading the quote can check it. Every money figure is computed exactly from its
// inputs and rounded once to whole minor units (lib/quotes/money.ts: halves up); the subtotal,
// overhead, margin and total are sums of those rounded figures, so the page adds up to the unit.
//
// Scrap is priced by the units started beyond the requested quantity (yield from recorded
// outcomes, lib/quotes/yield.ts): feedstock, printing, wash and furnace are figured for the good
// units, and "expected scrap" carries those same four per-unit costs for the extra units.
// Finishing and inspection are done on good units only.

import { feedstockDensity, type FaceStock } from "@/lib/process/scale-up";
import { roundMinor } from "./money";
import { quantityToStart, type MaterialYield } from "./yield";

export type CostRates = {
  printer_rate_minor_per_h: number;
  wash_batch_cost_minor: number;
  wash_batch_volume_cm3: number;
  furnace_run_cost_minor: number;
  furnace_gas_cost_minor: number;
  furnace_energy_cost_minor: number;
  finishing_rate_minor_per_h: number;
  finishing_min_per_cm2: number;
  inspection_rate_minor_per_h: number;
  inspection_min_per_unit: number;
  overhead_bp: number;
  margin_bp: number;
};

export type CostMaterial = {
  code: string;
  feedstock_minor_per_kg: number;
  /** Printed share of the part's green volume (shells + infill); 1 = solid. */
  infill_fraction: number;
  /** Supports and raft as a share of the part's green volume. */
  support_fraction: number;
  solids_loading: number;
  theoretical_density_g_cm3: number;
  binder_density_g_cm3: number;
};

/** A machine's own rates; null = the shop's rate (quote_settings) for that figure. */
export type PrinterRate = { rate_minor_per_h: number | null };
export type FurnaceRates = { run_cost_minor: number | null; gas_cost_minor: number | null; energy_cost_minor: number | null };

export type CostPrinter = PrinterRate & { name: string; deposition_cm3_per_h: number; layer_height_mm: number; layer_overhead_s: number };
export type CostFurnace = FurnaceRates & { name: string; tray_x_mm: number; tray_y_mm: number; tray_count: number };

type Sourced = { minor: number; source: string };

/** The printer's own hourly rate, else the shop's; says which, for the figure's inputs. */
export function printerRateOf(p: PrinterRate & { name: string }, rates: Pick<CostRates, "printer_rate_minor_per_h">): Sourced {
  return p.rate_minor_per_h === null
    ? { minor: rates.printer_rate_minor_per_h, source: `shop rate (${p.name} has none of its own)` }
    : { minor: p.rate_minor_per_h, source: `${p.name}'s own rate` };
}

/** One run's cost on this furnace: its own run, gas and energy figures, each else the shop's. */
export function furnaceRunCostOf(
  f: FurnaceRates & { name: string },
  rates: Pick<CostRates, "furnace_run_cost_minor" | "furnace_gas_cost_minor" | "furnace_energy_cost_minor">,
): { run: Sourced; gas: Sourced; energy: Sourced; total_minor: number } {
  const pick = (own: number | null, shop: number): Sourced => (own === null ? { minor: shop, source: "shop" } : { minor: own, source: f.name });
  const run = pick(f.run_cost_minor, rates.furnace_run_cost_minor);
  const gas = pick(f.gas_cost_minor, rates.furnace_gas_cost_minor);
  const energy = pick(f.energy_cost_minor, rates.furnace_energy_cost_minor);
  return { run, gas, energy, total_minor: run.minor + gas.minor + energy.minor };
}

/** Finishing minutes of one unit: stocked area × minutes per cm² × the Ra and tolerance factors. */
export function finishingMinutesPerUnit(
  nominal: { x: number; y: number; z: number },
  stock: FaceStock,
  targetRaUm: number | null,
  toleranceUm: number | null,
  minPerCm2: number,
): number {
  return (stockedAreaMm2(nominal, stock) / 100) * minPerCm2 * raFactor(targetRaUm) * toleranceFactor(toleranceUm);
}

export type CostLineInput = {
  quantity: number;
  yield: MaterialYield;
  /** Solid green volume of one unit (scaled up), mm³. */
  green_volume_mm3: number;
  green_mm: { x: number; y: number; z: number };
  nominal_mm: { x: number; y: number; z: number };
  stock: FaceStock;
  target_ra_um: number | null;
  tolerance_um: number | null;
  material: CostMaterial;
  printer: CostPrinter;
  /** Units of this part on one build plate (they share the per-layer overhead). */
  units_per_plate: number;
  furnace: CostFurnace;
  tray_clearance_mm: number;
};

export type CostFigure = {
  key: "feedstock" | "printing" | "wash" | "furnace" | "finishing" | "inspection" | "scrap" | "subtotal" | "overhead" | "margin" | "total";
  label: string;
  formula: string;
  inputs: Record<string, string | number>;
  minor: number;
};

export type LineCost = {
  quantity: number;
  quantity_to_start: number;
  figures: CostFigure[];
  total_minor: number;
  unit_price_minor: number;
};

const r4 = (x: number) => Math.round(x * 1e4) / 1e4;

/** Area of the nominal faces that carry stock (those are the faces ground or machined), mm². */
export function stockedAreaMm2(nominal: { x: number; y: number; z: number }, stock: FaceStock): number {
  const faces: Array<[number, number]> = [
    [stock.x_neg, nominal.y * nominal.z], [stock.x_pos, nominal.y * nominal.z],
    [stock.y_neg, nominal.x * nominal.z], [stock.y_pos, nominal.x * nominal.z],
    [stock.z_neg, nominal.x * nominal.y], [stock.z_pos, nominal.x * nominal.y],
  ];
  return faces.reduce((s, [mm, a]) => s + (mm > 0 ? a : 0), 0);
}

// A finer finish or a tighter tolerance takes more passes and slower feeds. The steps are a
// shop's planning factors: common practice (no published source); the shop can read them here.
export function raFactor(raUm: number | null): number {
  if (raUm === null) return 1;
  if (raUm <= 0.4) return 3;
  if (raUm <= 0.8) return 2;
  if (raUm <= 1.6) return 1.5;
  return 1;
}
export function toleranceFactor(tolUm: number | null): number {
  if (tolUm === null) return 1;
  if (tolUm <= 10) return 2;
  if (tolUm <= 25) return 1.5;
  return 1;
}

export function lineCost(input: CostLineInput, rates: CostRates): LineCost {
  const q = input.quantity;
  const start = quantityToStart(q, input.yield.estimate);
  const extra = start - q;
  const m = input.material;
  const vGreenCm3 = input.green_volume_mm3 / 1000;
  const vFeedCm3 = vGreenCm3 * (m.infill_fraction + m.support_fraction);
  const rhoFeed = feedstockDensity(m.solids_loading, m.theoretical_density_g_cm3, m.binder_density_g_cm3);
  const massG = vFeedCm3 * rhoFeed;
  const feedUnit = (massG / 1000) * m.feedstock_minor_per_kg;

  const p = input.printer;
  const layers = Math.ceil(input.green_mm.z / p.layer_height_mm - 1e-9);
  const printMinUnit = (vFeedCm3 / p.deposition_cm3_per_h) * 60 + (layers * p.layer_overhead_s) / 60 / input.units_per_plate;
  const pRate = printerRateOf(p, rates);
  const printUnit = (printMinUnit / 60) * pRate.minor;

  const washShare = vGreenCm3 / rates.wash_batch_volume_cm3;
  const washUnit = washShare * rates.wash_batch_cost_minor;

  const f = input.furnace;
  const c = input.tray_clearance_mm;
  const footprint = (input.green_mm.x + 2 * c) * (input.green_mm.y + 2 * c);
  const trayArea = f.tray_x_mm * f.tray_y_mm * f.tray_count;
  const fCost = furnaceRunCostOf(f, rates);
  const runCost = fCost.total_minor;
  const furnaceShare = footprint / trayArea;
  const furnaceUnit = furnaceShare * runCost;

  const areaCm2 = stockedAreaMm2(input.nominal_mm, input.stock) / 100;
  const fRa = raFactor(input.target_ra_um);
  const fTol = toleranceFactor(input.tolerance_um);
  const finishMinUnit = finishingMinutesPerUnit(input.nominal_mm, input.stock, input.target_ra_um, input.tolerance_um, rates.finishing_min_per_cm2);

  const y = input.yield;
  const yieldText = y.interval
    ? `${y.good} good of ${y.good + y.scrapped} recorded; 95 % Wilson interval ${(y.interval.low * 100).toFixed(1)}–${(y.interval.high * 100).toFixed(1)} %`
    : "no recorded outcomes yet: the shop's fallback yield";

  const figures: CostFigure[] = [
    {
      key: "feedstock",
      label: "Feedstock",
      formula: "q × V_green × (infill + supports) × ρ_feed / 1000 × price per kg; ρ_feed = φ·ρ_metal + (1 − φ)·ρ_binder",
      inputs: {
        q, V_green_cm3: r4(vGreenCm3), infill: m.infill_fraction, supports: m.support_fraction, phi: m.solids_loading,
        rho_metal_g_cm3: m.theoretical_density_g_cm3, rho_binder_g_cm3: m.binder_density_g_cm3, rho_feed_g_cm3: r4(rhoFeed),
        mass_per_unit_g: r4(massG), price_minor_per_kg: m.feedstock_minor_per_kg,
      },
      minor: roundMinor(q * feedUnit),
    },
    {
      key: "printing",
      label: `Printing (${p.name})`,
      formula: `q × (V_feed / deposition rate × 60 + layers × overhead s / 60 / units per plate) / 60 × rate per h (${pRate.source})`,
      inputs: {
        q, V_feed_cm3: r4(vFeedCm3), deposition_cm3_per_h: p.deposition_cm3_per_h, layers, layer_overhead_s: p.layer_overhead_s,
        units_per_plate: input.units_per_plate, minutes_per_unit: r4(printMinUnit), rate_minor_per_h: pRate.minor, rate_source: pRate.source,
      },
      minor: roundMinor(q * printUnit),
    },
    {
      key: "wash",
      label: "Solvent wash (share of a batch)",
      formula: "q × V_green / typical batch volume × batch cost",
      inputs: { q, V_green_cm3: r4(vGreenCm3), batch_volume_cm3: rates.wash_batch_volume_cm3, share: r4(washShare), batch_cost_minor: rates.wash_batch_cost_minor },
      minor: roundMinor(q * washUnit),
    },
    {
      key: "furnace",
      label: `Furnace (tray-area share of a run, ${f.name})`,
      formula: `q × (x + 2c)(y + 2c) / (tray x × tray y × trays) × (run + gas + energy) (run: ${fCost.run.source}, gas: ${fCost.gas.source}, energy: ${fCost.energy.source})`,
      inputs: {
        q, green_x_mm: r4(input.green_mm.x), green_y_mm: r4(input.green_mm.y), clearance_mm: c, tray_area_mm2: trayArea, share: r4(furnaceShare),
        run_minor: fCost.run.minor, run_source: fCost.run.source, gas_minor: fCost.gas.minor, gas_source: fCost.gas.source,
        energy_minor: fCost.energy.minor, energy_source: fCost.energy.source,
      },
      minor: roundMinor(q * furnaceUnit),
    },
    {
      key: "finishing",
      label: "Finishing (stocked faces)",
      formula: "q × stocked area cm² × min per cm² × Ra factor × tolerance factor / 60 × rate per h",
      inputs: {
        q, stocked_area_cm2: r4(areaCm2), min_per_cm2: rates.finishing_min_per_cm2, target_ra_um: input.target_ra_um ?? "none", ra_factor: fRa,
        tolerance_um: input.tolerance_um ?? "none", tolerance_factor: fTol, minutes_per_unit: r4(finishMinUnit), rate_minor_per_h: rates.finishing_rate_minor_per_h,
      },
      minor: roundMinor((q * finishMinUnit * rates.finishing_rate_minor_per_h) / 60),
    },
    {
      key: "inspection",
      label: "Inspection",
      formula: "q × minutes per unit / 60 × rate per h",
      inputs: { q, minutes_per_unit: rates.inspection_min_per_unit, rate_minor_per_h: rates.inspection_rate_minor_per_h },
      minor: roundMinor((q * rates.inspection_min_per_unit * rates.inspection_rate_minor_per_h) / 60),
    },
    {
      key: "scrap",
      label: "Expected scrap",
      formula: "(start − q) × (feedstock + printing + wash + furnace per unit); start = ⌈q / yield⌉",
      inputs: {
        q, yield: r4(y.estimate), yield_source: y.source, evidence: yieldText, start, extra_units: extra,
        per_unit_minor: r4(feedUnit + printUnit + washUnit + furnaceUnit),
      },
      minor: roundMinor(extra * (feedUnit + printUnit + washUnit + furnaceUnit)),
    },
  ];
  const subtotal = figures.reduce((s, x) => s + x.minor, 0);
  const overhead = roundMinor((subtotal * rates.overhead_bp) / 10_000);
  const margin = roundMinor(((subtotal + overhead) * rates.margin_bp) / 10_000);
  const total = subtotal + overhead + margin;
  figures.push(
    { key: "subtotal", label: "Direct cost", formula: "sum of the figures above", inputs: {}, minor: subtotal },
    { key: "overhead", label: "Overhead", formula: "direct cost × overhead % ", inputs: { direct_minor: subtotal, overhead_pct: rates.overhead_bp / 100 }, minor: overhead },
    { key: "margin", label: "Margin", formula: "(direct cost + overhead) × margin %", inputs: { base_minor: subtotal + overhead, margin_pct: rates.margin_bp / 100 }, minor: margin },
    { key: "total", label: "Line total", formula: "direct cost + overhead + margin", inputs: {}, minor: total },
  );
  return { quantity: q, quantity_to_start: start, figures, total_minor: total, unit_price_minor: roundMinor(total / q) };
}
