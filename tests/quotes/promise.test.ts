import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { maxQuantityBy, planPromise, type PromiseInput, type PromiseOpenRun } from "@/lib/quotes/promise";
import { packTrays } from "@/lib/packing/trays";
import { isStaffed } from "@/lib/process/time-zone";

const H = 3_600_000;
const NOW = Date.parse("2026-12-07T08:00:00Z"); // a Monday
const staffed = { pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })), timeZone: "UTC" };
const PROFILE = "P-std r1";

function base(overrides: Partial<PromiseInput> = {}): PromiseInput {
  return {
    now: NOW,
    horizon_days: 60,
    staffed,
    start_quantity: 10,
    finish_quantity: 9,
    unit: { material_id: "m1", profile_id: PROFILE, green_mm: { x: 30, y: 20, z: 20 }, green_volume_mm3: 6000, mass_g: 30, wash_minutes: 600, finishing_minutes: 10 },
    printers: [
      { id: "p1", name: "P1", build_x_mm: 250, build_y_mm: 200, build_z_mm: 150, deposition_cm3_per_h: 20, layer_height_mm: 0.2, layer_overhead_s: 6, material_ids: ["m1"], active: true, busy: [[NOW, NOW + 30 * H]] },
      { id: "p2", name: "P2", build_x_mm: 120, build_y_mm: 100, build_z_mm: 150, deposition_cm3_per_h: 15, layer_height_mm: 0.2, layer_overhead_s: 6, material_ids: ["m1"], active: true, busy: [[NOW + 2 * H, NOW + 20 * H]] },
    ],
    plate_clearance_mm: 5,
    wash_stations: [{ id: "w1", name: "W1", capacity_units: 8, basket_mm: [300, 300, 200], busy: [[NOW + 40 * H, NOW + 50 * H]] }],
    drying_minutes: 120,
    furnaces: [{ spec: { id: "F1", tray_mm: [300, 200], tray_count: 2, usable_height_mm: 100, max_load_g: 20_000, profiles: [PROFILE] }, name: "F1", busy: [[NOW + 60 * H, NOW + 80 * H]], cycles: { [PROFILE]: 1200 } }],
    open_runs: [],
    tray_clearance_mm: 5,
    finishing_lead_minutes: 1440,
    spread: { print: { p90_ratio: 1.2, samples: 10, source: "history" }, wash: { p90_ratio: 1.1, samples: 10, source: "history" }, furnace: { p90_ratio: 1.05, samples: 10, source: "history" }, finishing: { p90_ratio: 1.25, samples: 0, source: "fallback" } },
    ...overrides,
  };
}

const overlaps = (a: [number, number], b: [number, number]) => a[0] < b[1] && b[0] < a[1];

describe("capable-to-promise", () => {
  it("plans a feasible chain that respects bookings, staffed starts and step order", () => {
    const input = base();
    const r = planPromise(input);
    expect(r.feasible).toBe(true);
    if (!r.feasible) return;
    const steps = r.steps;
    const byKind = (k: string) => steps.filter((s) => s.kind === k);
    for (const s of [...byKind("print"), ...byKind("wash"), ...byKind("furnace")]) {
      const iv: [number, number] = [Date.parse(s.start), Date.parse(s.end)];
      const busy = s.kind === "print" ? input.printers.find((p) => p.id === s.resource_id)!.busy : s.kind === "wash" ? input.wash_stations[0].busy : input.furnaces[0].busy;
      for (const b of busy) expect(overlaps(iv, b)).toBe(false);
      expect(isStaffed(new Date(iv[0]), staffed.pattern, "UTC")).toBe(true);
    }
    const printEnd = Math.max(...byKind("print").map((s) => Date.parse(s.end)));
    const washStart = Math.min(...byKind("wash").map((s) => Date.parse(s.start)));
    const washEnd = Math.max(...byKind("wash").map((s) => Date.parse(s.end)));
    const furnaceStart = Math.min(...byKind("furnace").map((s) => Date.parse(s.start)));
    expect(washStart).toBeGreaterThanOrEqual(printEnd);
    expect(furnaceStart).toBeGreaterThanOrEqual(washEnd + 120 * 60_000);
    expect(byKind("print").reduce((s, x) => s + x.units, 0)).toBe(10);
    expect(byKind("wash").reduce((s, x) => s + x.units, 0)).toBe(10);
    expect(byKind("furnace").reduce((s, x) => s + x.units, 0)).toBe(10);
    expect(Date.parse(r.completion)).toBeGreaterThan(Math.max(...byKind("furnace").map((s) => Date.parse(s.end))));
    expect(Date.parse(r.p90)).toBeGreaterThanOrEqual(Date.parse(r.completion));
    expect(steps.some((s) => s.critical && s.kind === "print")).toBe(true);
    for (const s of steps) expect(s.slack_min).toBeGreaterThanOrEqual(0);
  });

  it("a fuller schedule never gives an earlier date (monotonicity)", () => {
    const interval = fc.tuple(fc.integer({ min: 0, max: 400 }), fc.integer({ min: 1, max: 40 })).map(([s, d]) => [NOW + s * H, NOW + (s + d) * H] as [number, number]);
    fc.assert(
      fc.property(
        fc.record({ p1: fc.array(interval, { maxLength: 6 }), p2: fc.array(interval, { maxLength: 6 }), w: fc.array(interval, { maxLength: 6 }), f: fc.array(interval, { maxLength: 6 }) }),
        fc.integer({ min: 1, max: 30 }),
        (extra, q) => {
          const a = base({ start_quantity: q, finish_quantity: q });
          const b: PromiseInput = {
            ...a,
            printers: [{ ...a.printers[0], busy: [...a.printers[0].busy, ...extra.p1] }, { ...a.printers[1], busy: [...a.printers[1].busy, ...extra.p2] }],
            wash_stations: [{ ...a.wash_stations[0], busy: [...a.wash_stations[0].busy, ...extra.w] }],
            furnaces: [{ ...a.furnaces[0], busy: [...a.furnaces[0].busy, ...extra.f] }],
          };
          const ra = planPromise(a);
          const rb = planPromise(b);
          if (!ra.feasible) return expect(rb.feasible).toBe(false);
          if (rb.feasible) expect(Date.parse(rb.completion)).toBeGreaterThanOrEqual(Date.parse(ra.completion));
        },
      ),
      { numRuns: 60 },
    );
  });

  it("says so when the line cannot fit before the horizon", () => {
    const input = base({ horizon_days: 10 });
    input.printers = input.printers.map((p) => ({ ...p, busy: [[NOW - H, NOW + 30 * 24 * H]] }));
    const r = planPromise(input);
    expect(r).toMatchObject({ feasible: false, step: "print" });
    if (!r.feasible) expect(r.reason).toMatch(/10-day planning horizon/);
  });

  it("joins an open run with room instead of waiting for a new one, without booking it", () => {
    const plain = planPromise(base());
    expect(plain.feasible).toBe(true);
    if (!plain.feasible) return;
    const dry = Math.min(...plain.steps.filter((s) => s.kind === "furnace").map((s) => Date.parse(s.start)));
    // An open run of the same profile an hour after the lot is dry: a new run could only follow it.
    const existing = [{ id: "x1", profile: PROFILE, footprint_mm: [40, 40] as [number, number], height_mm: 20, mass_g: 50 }];
    const layout = packTrays({ clearance_mm: 5, furnaces: [base().furnaces[0].spec], units: existing }).runs[0];
    const run: PromiseOpenRun = { id: "run-1", code: "R-1", furnace_id: "F1", profile_id: PROFILE, starts_at: dry + H, ends_at: dry + H + 1200 * 60_000, layout, units: existing };
    const input = base({ open_runs: [run] });
    // Keep the furnace busy over the run's own slot (it is booked).
    input.furnaces = [{ ...input.furnaces[0], busy: [...input.furnaces[0].busy, [run.starts_at, run.ends_at]] }];
    const r = planPromise(input);
    expect(r.feasible).toBe(true);
    if (!r.feasible) return;
    const joined = r.steps.filter((s) => s.joins_run === "run-1");
    expect(joined.length).toBe(1);
    expect(joined[0].units).toBe(10);
    expect(r.steps.filter((s) => s.kind === "furnace" && !s.joins_run)).toHaveLength(0);
    expect(run.layout).toBe(layout);
  });

  it("answers how many can be done by a date", () => {
    const ten = planPromise(base({ start_quantity: 10, finish_quantity: 10 }));
    expect(ten.feasible).toBe(true);
    if (!ten.feasible) return;
    const deadline = Date.parse(ten.completion);
    const r = maxQuantityBy(deadline, 60, (n) => base({ start_quantity: n, finish_quantity: n }));
    expect(r.quantity).toBeGreaterThanOrEqual(10);
    const at = planPromise(base({ start_quantity: r.quantity, finish_quantity: r.quantity }));
    expect(at.feasible && Date.parse(at.completion) <= deadline).toBe(true);
    if (r.quantity < 60) {
      const over = planPromise(base({ start_quantity: r.quantity + 1, finish_quantity: r.quantity + 1 }));
      expect(over.feasible && Date.parse(over.completion) <= deadline).toBe(false);
    }
  });
});
