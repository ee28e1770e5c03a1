// A whole quote, line by line: the scale-up gives each line's green part, the tentative plan
// (lib/quotes/promise.ts) says when and on which printer and furnace, and the cost
// (lib/quotes/cost.ts) is figured on the printer and furnace the plan chose. Lines are planned
// in order, each one into the schedule as the earlier lines left it, so two lines never count
// on the same free slot. Pure: the database read that feeds it is db/quotes/reads.ts.

import { feedstockDensity, scaleUp, type FaceStock } from "@/lib/process/scale-up";
import { washMinutes } from "@/lib/process/wash";
import { finishingMinutesPerUnit, lineCost, type CostMaterial, type CostRates, type FurnaceRates, type LineCost } from "./cost";
import { materialYield, quantityToStart, type MaterialYield } from "./yield";
import { planPromise, type FinishingJob, type PromiseFurnace, type PromiseInput, type PromiseResult, type PromiseShop } from "./promise";
import type { StaffedHours } from "@/lib/planning/staffed-hours";

export type QuoteRates = CostRates & { setup_minor_per_order: number; fallback_yield: number };

export type QuoteMaterial = CostMaterial & {
  id: string;
  name: string;
  shrink_xy: number;
  shrink_z: number;
  wash_k_min_per_mm2: number;
  wash_min_minutes: number;
  /** The material's default sinter profile as the packer names it ("code rN"), or null. */
  profile_label: string | null;
};

export type QuoteContext = PromiseShop & {
  rates: QuoteRates;
  /** Printers' and furnaces' own rates by id; a missing one takes the shop's (lib/quotes/cost). */
  printer_rates: Map<string, number>;
  furnace_rates: Map<string, FurnaceRates>;
  materials: Map<string, QuoteMaterial>;
  yields: Map<string, { good: number; scrapped: number }>;
};

export type QuoteLineSpec = {
  id: string;
  name: string;
  material_id: string;
  quantity: number;
  nominal: { x: number; y: number; z: number };
  volume_mm3: number | null;
  thickest_wall_mm: number;
  stock: FaceStock;
  target_ra_um: number | null;
  tolerance_um: number | null;
  requested_at: string | null;
};

export type LineUnit = {
  green_mm: { x: number; y: number; z: number };
  green_volume_mm3: number;
  volume_estimated: boolean;
  green_mass_g: number;
  wash_minutes: number;
  finishing_minutes: number;
};

export type EvaluatedLine = {
  line_id: string;
  name: string;
  quantity: number;
  quantity_to_start: number;
  yield: MaterialYield;
  unit: LineUnit;
  cost: LineCost | null;
  promise: PromiseResult;
  /** Requested date missed by the earliest completion (null when no date was asked for). */
  meets_requested: boolean | null;
};

export type EvaluatedQuote = {
  lines: EvaluatedLine[];
  setup_minor: number;
  total_minor: number | null;
  feasible: boolean;
  completion: string | null;
  p90: string | null;
  evaluated_at: string;
};

export function lineUnit(line: QuoteLineSpec, m: QuoteMaterial, rates: Pick<CostRates, "finishing_min_per_cm2">): LineUnit {
  const s = scaleUp({ nominal: line.nominal, stock: line.stock, shrink: { xy: m.shrink_xy, z: m.shrink_z } });
  // Kept to the micrometre, as a part stores its green size (db/parts scaleFields), so the plan
  // a quote makes and the bookings its order gets estimate the same print time.
  const um = (x: number) => Math.round(x * 1000) / 1000;
  const green = { x: um(s.x.green), y: um(s.y.green), z: um(s.z.green) };
  const grow = (green.x / line.nominal.x) * (green.y / line.nominal.y) * (green.z / line.nominal.z);
  const estimated = !(line.volume_mm3 && line.volume_mm3 > 0);
  // Without geometry: half the bounding box, as the build estimate does (lib/builds/estimate).
  const vol = estimated ? 0.5 * green.x * green.y * green.z : line.volume_mm3! * grow;
  const rho = feedstockDensity(m.solids_loading, m.theoretical_density_g_cm3, m.binder_density_g_cm3);
  const finishing = finishingMinutesPerUnit(line.nominal, line.stock, line.target_ra_um, line.tolerance_um, rates.finishing_min_per_cm2);
  return {
    green_mm: green,
    green_volume_mm3: vol,
    volume_estimated: estimated,
    green_mass_g: (vol / 1000) * rho,
    wash_minutes: washMinutes({ thickestWallMm: line.thickest_wall_mm, kMinPerMm2: m.wash_k_min_per_mm2, minMinutes: m.wash_min_minutes }),
    finishing_minutes: finishing,
  };
}

function withBookings(ctx: QuoteContext, promise: PromiseResult): QuoteContext {
  if (!promise.feasible) return ctx;
  const add = (busy: [number, number][], s: string, e: string) => [...busy, [Date.parse(s), Date.parse(e)] as [number, number]];
  const printers = ctx.printers.map((p) => {
    let busy = p.busy;
    for (const s of promise.steps) if (s.kind === "print" && s.resource_id === p.id) busy = add(busy, s.start, s.end);
    return busy === p.busy ? p : { ...p, busy };
  });
  const wash_stations = ctx.wash_stations.map((w) => {
    let busy = w.busy;
    for (const s of promise.steps) if (s.kind === "wash" && s.resource_id === w.id) busy = add(busy, s.start, s.end);
    return busy === w.busy ? w : { ...w, busy };
  });
  const furnaces = ctx.furnaces.map((f) => {
    let busy = f.busy;
    for (const s of promise.steps) if (s.kind === "furnace" && !s.joins_run && s.resource_id === f.spec.id) busy = add(busy, s.start, s.end);
    return busy === f.busy ? f : { ...f, busy };
  });
  // A run this line joined has less room now; the next line plans around it rather than in it.
  const joined = new Set(promise.steps.map((s) => s.joins_run).filter(Boolean));
  // This line's finishing joins the machinists' queue ahead of any later line released after it.
  const finishing_queue = [...ctx.finishing_queue, { release: promise.finishing.release, minutes: promise.finishing.minutes }];
  return { ...ctx, printers, wash_stations, furnaces, finishing_queue, open_runs: ctx.open_runs.filter((r) => !joined.has(r.id)) };
}

export function promiseInputFor(line: QuoteLineSpec, unit: LineUnit, m: QuoteMaterial, ctx: QuoteContext, startQuantity: number, finishQuantity: number): PromiseInput {
  // The quote's own fields (rates, materials, yields) stay here; the promise takes the shop.
  const { rates: _rates, printer_rates: _printerRates, furnace_rates: _furnaceRates, materials: _materials, yields: _yields, ...shop } = ctx;
  return {
    ...shop,
    start_quantity: startQuantity,
    finish_quantity: finishQuantity,
    unit: {
      material_id: line.material_id,
      profile_id: m.profile_label,
      green_mm: unit.green_mm,
      green_volume_mm3: unit.green_volume_mm3,
      mass_g: unit.green_mass_g,
      wash_minutes: unit.wash_minutes,
      finishing_minutes: unit.finishing_minutes,
    },
  };
}

export function evaluateQuote(lines: QuoteLineSpec[], ctx0: QuoteContext): EvaluatedQuote {
  let ctx = ctx0;
  const out: EvaluatedLine[] = [];
  for (const line of lines) {
    const m = ctx.materials.get(line.material_id);
    if (!m) throw new Error(`internal: material ${line.material_id} missing from the quote context`);
    const rec = ctx.yields.get(line.material_id) ?? { good: 0, scrapped: 0 };
    const y = materialYield(rec.good, rec.scrapped, ctx.rates.fallback_yield);
    const start = quantityToStart(line.quantity, y.estimate);
    const unit = lineUnit(line, m, ctx.rates);
    const promise = planPromise(promiseInputFor(line, unit, m, ctx, start, line.quantity));
    let cost: LineCost | null = null;
    if (promise.feasible) {
      const plate = promise.plates[0];
      const printer = ctx.printers.find((p) => p.id === plate.printer_id)!;
      const furnaceStep = promise.steps.find((s) => s.kind === "furnace");
      const furnace = ctx.furnaces.find((f) => f.spec.id === furnaceStep?.resource_id) ?? ctx.furnaces[0];
      cost = lineCost(
        {
          quantity: line.quantity,
          yield: y,
          green_volume_mm3: unit.green_volume_mm3,
          green_mm: unit.green_mm,
          nominal_mm: line.nominal,
          stock: line.stock,
          target_ra_um: line.target_ra_um,
          tolerance_um: line.tolerance_um,
          material: m,
          printer: { ...printer, rate_minor_per_h: ctx.printer_rates.get(printer.id) ?? null },
          units_per_plate: plate.units,
          furnace: {
            name: furnace.name, tray_x_mm: furnace.spec.tray_mm[0], tray_y_mm: furnace.spec.tray_mm[1], tray_count: furnace.spec.tray_count,
            ...(ctx.furnace_rates.get(furnace.spec.id) ?? { run_cost_minor: null, gas_cost_minor: null, energy_cost_minor: null }),
          },
          tray_clearance_mm: ctx.tray_clearance_mm,
        },
        ctx.rates,
      );
      ctx = withBookings(ctx, promise);
    }
    out.push({
      line_id: line.id,
      name: line.name,
      quantity: line.quantity,
      quantity_to_start: start,
      yield: y,
      unit,
      cost,
      promise,
      meets_requested: line.requested_at && promise.feasible ? Date.parse(promise.completion) <= Date.parse(line.requested_at) : null,
    });
  }
  const feasible = out.length > 0 && out.every((l) => l.promise.feasible);
  const ends = out.flatMap((l) => (l.promise.feasible ? [l.promise.completion] : []));
  const p90s = out.flatMap((l) => (l.promise.feasible ? [l.promise.p90] : []));
  const setup = out.length ? ctx0.rates.setup_minor_per_order : 0;
  return {
    lines: out,
    setup_minor: setup,
    total_minor: feasible ? out.reduce((s, l) => s + (l.cost?.total_minor ?? 0), 0) + setup : null,
    feasible,
    completion: feasible ? ends.sort().at(-1)! : null,
    p90: feasible ? p90s.sort().at(-1)! : null,
    evaluated_at: new Date(ctx0.now).toISOString(),
  };
}
