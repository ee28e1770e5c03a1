// Capable-to-promise speed: one 10-unit quote line planned into a busy shop (500 booked builds
// over 8 printers, 100 open furnace runs with room over 4 furnaces, wash stations in use, the
// finishing queue of those runs' units) and priced. Target: at most 1 s. The first call pays for the plate layouts (remembered across plans
// after that), so both the cold and the warm figure are reported.

import { packTrays } from "@/lib/packing/trays";
import { evaluateQuote, type QuoteContext, type QuoteLineSpec } from "@/lib/quotes/evaluate";
import type { PromiseOpenRun } from "@/lib/quotes/promise";
import type { BenchRow, BenchSection } from "../types";

const H = 3_600_000;
const PROFILE = "174PH-std r1";

function context(now: number): QuoteContext {
  const printers = Array.from({ length: 8 }, (_, i) => {
    // 500 builds: 62 or 63 per printer, 18 h each with 2 h gaps, back to back from now.
    const n = i < 4 ? 63 : 62;
    const busy = Array.from({ length: n }, (_, k) => [now + k * 20 * H, now + k * 20 * H + 18 * H] as [number, number]);
    return { id: `p${i}`, name: `Printer ${i}`, build_x_mm: 300, build_y_mm: 220, build_z_mm: 180, deposition_cm3_per_h: 20, layer_height_mm: 0.2, layer_overhead_s: 6, material_ids: ["m1"], active: true, busy };
  });
  const furnaceSpecs = Array.from({ length: 4 }, (_, i) => ({ id: `F${i}`, tray_mm: [400, 300] as [number, number], tray_count: 3, usable_height_mm: 120, max_load_g: 30_000, profiles: [PROFILE] }));
  const open_runs: PromiseOpenRun[] = [];
  for (let r = 0; r < 100; r++) {
    const f = furnaceSpecs[r % 4];
    const units = Array.from({ length: 6 }, (_, k) => ({ id: `r${r}u${k}`, profile: PROFILE, footprint_mm: [50, 40] as [number, number], height_mm: 30, mass_g: 120 }));
    const layout = packTrays({ clearance_mm: 5, furnaces: [f], units }).runs[0];
    const start = now + (Math.floor(r / 4) * 26 + 2) * H;
    open_runs.push({ id: `run${r}`, code: `R-${r}`, furnace_id: f.id, profile_id: PROFILE, starts_at: start, ends_at: start + 24 * H, layout, units });
  }
  return {
    now,
    horizon_days: 120,
    staffed: { pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })), timeZone: "America/Detroit" },
    printers,
    plate_clearance_mm: 5,
    wash_stations: Array.from({ length: 2 }, (_, i) => ({ id: `w${i}`, name: `Wash ${i}`, capacity_units: 24, basket_mm: [400, 300, 200] as [number, number, number], busy: Array.from({ length: 150 }, (_, k) => [now + k * 8 * H, now + k * 8 * H + 6 * H] as [number, number]) })),
    drying_minutes: 120,
    furnaces: furnaceSpecs.map((spec) => ({ spec, name: spec.id, busy: open_runs.filter((r) => r.furnace_id === spec.id).map((r) => [r.starts_at, r.ends_at] as [number, number]), cycles: { [PROFILE]: 1440 } })),
    open_runs,
    tray_clearance_mm: 5,
    // Three machinists; the 600 units of the open runs queue for finishing as their runs end,
    // 120 machinist-minutes each, and 60 units are waiting now. The quoted lot is released after
    // the printers' backlog, when this queue has been worked off: the queue is walked in full
    // but does not delay it (detail.finishing_wait_min).
    finishing_lanes: 3,
    finishing_queue: [
      { release: now, minutes: 60 * 120 },
      ...open_runs.map((r) => ({ release: r.ends_at + 2880 * 60_000, minutes: r.units.length * 120 })),
    ],
    printer_rates: new Map([["p0", 2600]]),
    furnace_rates: new Map([["F0", { run_cost_minor: 30000, gas_cost_minor: 9500, energy_cost_minor: null }]]),
    spread: { print: { p90_ratio: 1.15, samples: 40, source: "history" }, wash: { p90_ratio: 1.1, samples: 40, source: "history" }, furnace: { p90_ratio: 1.05, samples: 40, source: "history" }, finishing: { p90_ratio: 1.25, samples: 0, source: "fallback" } },
    rates: {
      printer_rate_minor_per_h: 1800, wash_batch_cost_minor: 4500, wash_batch_volume_cm3: 1500, furnace_run_cost_minor: 22000, furnace_gas_cost_minor: 6500, furnace_energy_cost_minor: 9000,
      finishing_rate_minor_per_h: 7200, finishing_min_per_cm2: 0.6, inspection_rate_minor_per_h: 6000, inspection_min_per_unit: 12, overhead_bp: 1800, margin_bp: 2200, setup_minor_per_order: 15000, fallback_yield: 0.9,
    },
    materials: new Map([["m1", {
      id: "m1", code: "17-4PH", name: "17-4 PH", feedstock_minor_per_kg: 16500, infill_fraction: 0.8, support_fraction: 0.12, solids_loading: 0.6, theoretical_density_g_cm3: 7.78, binder_density_g_cm3: 0.95,
      shrink_xy: 0.148, shrink_z: 0.16, wash_k_min_per_mm2: 12, wash_min_minutes: 120, profile_label: PROFILE,
    }]]),
    yields: new Map([["m1", { good: 180, scrapped: 14 }]]),
  };
}

const line: QuoteLineSpec = {
  id: "l1", name: "Bench bracket", material_id: "m1", quantity: 10, nominal: { x: 42, y: 30, z: 22 }, volume_mm3: 18_000, thickest_wall_mm: 6,
  stock: { x_neg: 0, x_pos: 0, y_neg: 0, y_pos: 0, z_neg: 0.3, z_pos: 0.3 }, target_ra_um: 1.6, tolerance_um: 25, requested_at: null,
};

export const section: BenchSection = {
  name: "quotes",
  async run(): Promise<BenchRow[]> {
    const now = Date.parse("2026-12-07T13:00:00Z");
    const ctx = context(now);
    const t0 = performance.now();
    const first = evaluateQuote([line], ctx);
    const cold = performance.now() - t0;
    const warm: number[] = [];
    for (let i = 0; i < 5; i++) {
      const t = performance.now();
      evaluateQuote([line], ctx);
      warm.push(performance.now() - t);
    }
    warm.sort((a, b) => a - b);
    const median = warm[2];
    const pr = first.lines[0].promise;
    const detail = {
      feasible: first.feasible, completion: first.completion, steps: pr.feasible ? pr.steps.length : 0, builds_booked: 500, open_runs: 100,
      finishing_jobs: ctx.finishing_queue.length, finishing_wait_min: pr.feasible ? pr.finishing.wait_min : null,
    };
    return [
      { section: "quotes", name: "promise + cost, 10-unit line, 500 builds, 100 open runs (cold)", metric: "ms", value: Math.round(cold), target: "≤ 1000", ok: cold <= 1000 && first.feasible, detail },
      { section: "quotes", name: "promise + cost, 10-unit line, 500 builds, 100 open runs (warm median of 5)", metric: "ms", value: Math.round(median), target: "≤ 1000", ok: median <= 1000 },
    ];
  },
};
