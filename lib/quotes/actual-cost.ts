// What a finished order really cost, figured from what was recorded on the floor with the same
// rates a quote uses, so it can stand beside the quoted direct cost and show which rate or yield
// is off. Each booking's cost is shared among the orders in it by their units:
//   feedstock – the grams drawn for each build (feedstock_draws) × the material's price per kg;
//               a build with no recorded draw counts the quote's feedstock per unit instead;
//   printing  – each build's recorded hours (finished − started) × its printer's rate (its own,
//               else the shop's); a build without both times counts its estimate, marked so;
//   wash      – the share of each wash batch × the shop's batch cost;
//   furnace   – the share of each furnace run × that furnace's run, gas and energy cost;
//   finishing – the minutes each unit spent in finishing (from its recorded state changes) × rate;
//   inspection – inspections recorded × the shop's minutes per inspection × rate (no time is
//               recorded per inspection);
//   set-up    – as quoted.
// Overhead and margin are left out on both sides: they are not costs the floor incurs.

import { furnaceRunCostOf, printerRateOf, type CostFigure, type CostRates, type FurnaceRates, type PrinterRate } from "./cost";
import { roundMinor } from "./money";

export type ActualBuild = {
  code: string;
  printer: PrinterRate & { name: string };
  minutes: number;
  /** Both start and finish were recorded (else `minutes` is the estimate). */
  recorded: boolean;
  /** This order's units on the plate, and all units on it. */
  units: number;
  units_total: number;
  /** Grams drawn for the whole build; null when no draw was recorded. */
  drawn_g: number | null;
  feedstock_minor_per_kg: number;
};
export type ActualShare = { code: string; units: number; units_total: number };
export type ActualRun = ActualShare & { furnace: FurnaceRates & { name: string } };

export type ActualCostInput = {
  builds: ActualBuild[];
  washes: ActualShare[];
  runs: ActualRun[];
  /** Recorded minutes in finishing, summed over the order's finished units. */
  finishing_minutes: number;
  inspections: number;
  setup_minor: number;
  /** Quoted feedstock per unit, for builds without a recorded draw. */
  quoted_feedstock_minor_per_unit: number;
};

export type ActualFigure = Omit<CostFigure, "key"> & { key: "feedstock" | "printing" | "wash" | "furnace" | "finishing" | "inspection" | "setup" | "total" };
export type ActualCost = { figures: ActualFigure[]; total_minor: number };

const share = (x: { units: number; units_total: number }) => (x.units_total > 0 ? x.units / x.units_total : 0);
const r4 = (x: number) => Math.round(x * 1e4) / 1e4;

export function actualCost(input: ActualCostInput, rates: CostRates): ActualCost {
  let feed = 0;
  let drawnG = 0;
  let undrawnUnits = 0;
  let print = 0;
  let printH = 0;
  let estimated = 0;
  for (const b of input.builds) {
    const sh = share(b);
    if (b.drawn_g === null) {
      undrawnUnits += b.units;
      feed += b.units * input.quoted_feedstock_minor_per_unit;
    } else {
      drawnG += sh * b.drawn_g;
      feed += ((sh * b.drawn_g) / 1000) * b.feedstock_minor_per_kg;
    }
    const rate = printerRateOf(b.printer, rates).minor;
    printH += (sh * b.minutes) / 60;
    print += ((sh * b.minutes) / 60) * rate;
    if (!b.recorded) estimated++;
  }
  const washShare = input.washes.reduce((s, w) => s + share(w), 0);
  let furnace = 0;
  let runShare = 0;
  for (const r of input.runs) {
    runShare += share(r);
    furnace += share(r) * furnaceRunCostOf(r.furnace, rates).total_minor;
  }
  const figures: ActualFigure[] = [
    {
      key: "feedstock", label: "Feedstock drawn",
      formula: "Σ builds: share of the build × grams drawn / 1000 × price per kg; builds with no draw: units × quoted feedstock per unit",
      inputs: { grams_drawn_share: r4(drawnG), units_without_draw: undrawnUnits, quoted_minor_per_unit: r4(input.quoted_feedstock_minor_per_unit) },
      minor: roundMinor(feed),
    },
    {
      key: "printing", label: "Printing (recorded hours)",
      formula: "Σ builds: share of the build × (finished − started) h × the printer's rate per h (its own, else the shop's)",
      inputs: { builds: input.builds.map((b) => b.code).join(", ") || "none", printer_hours_share: r4(printH), builds_without_times: estimated },
      minor: roundMinor(print),
    },
    {
      key: "wash", label: "Solvent wash (batches used)",
      formula: "Σ batches: order's units / units in the batch × batch cost",
      inputs: { batches: input.washes.map((w) => w.code).join(", ") || "none", batch_shares: r4(washShare), batch_cost_minor: rates.wash_batch_cost_minor },
      minor: roundMinor(washShare * rates.wash_batch_cost_minor),
    },
    {
      key: "furnace", label: "Furnace (runs used)",
      formula: "Σ runs: order's units / units in the run × (run + gas + energy) of that furnace (its own, else the shop's)",
      inputs: { runs: input.runs.map((r) => r.code).join(", ") || "none", run_shares: r4(runShare) },
      minor: roundMinor(furnace),
    },
    {
      key: "finishing", label: "Finishing (recorded minutes)",
      formula: "minutes from 'finishing' to 'done', summed over units / 60 × rate per h",
      inputs: { minutes: r4(input.finishing_minutes), rate_minor_per_h: rates.finishing_rate_minor_per_h },
      minor: roundMinor((input.finishing_minutes * rates.finishing_rate_minor_per_h) / 60),
    },
    {
      key: "inspection", label: "Inspection",
      formula: "inspections recorded × minutes per inspection / 60 × rate per h",
      inputs: { inspections: input.inspections, minutes_each: rates.inspection_min_per_unit, rate_minor_per_h: rates.inspection_rate_minor_per_h },
      minor: roundMinor((input.inspections * rates.inspection_min_per_unit * rates.inspection_rate_minor_per_h) / 60),
    },
  ];
  const direct = figures.reduce((s, f) => s + f.minor, 0) + input.setup_minor;
  figures.push(
    { key: "setup", label: "Set-up (as quoted)", formula: "the quote's set-up per order", inputs: {}, minor: input.setup_minor },
    { key: "total", label: "Actual direct cost", formula: "sum of the figures above", inputs: {}, minor: direct },
  );
  return { figures, total_minor: direct };
}

/** The quote's own direct cost (line subtotals + set-up, before overhead and margin) from its stored breakdown. */
export function quotedDirect(cost: unknown): { direct_minor: number; feedstock_minor_per_unit: number; setup_minor: number } | null {
  const c = cost as { lines?: { quantity?: number; cost?: { figures?: { key: string; minor: number }[] } | null }[]; setup_minor?: number } | null;
  if (!c || !Array.isArray(c.lines)) return null;
  let direct = 0;
  let feed = 0;
  let qty = 0;
  for (const l of c.lines) {
    const figs = l.cost?.figures ?? [];
    direct += figs.find((f) => f.key === "subtotal")?.minor ?? 0;
    feed += figs.find((f) => f.key === "feedstock")?.minor ?? 0;
    qty += l.quantity ?? 0;
  }
  const setup = Number(c.setup_minor ?? 0);
  return { direct_minor: direct + setup, feedstock_minor_per_unit: qty ? feed / qty : 0, setup_minor: setup };
}
