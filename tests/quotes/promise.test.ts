import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { maxQuantityBy, planPromise, type PromiseInput, type PromiseOpenRun } from "@/lib/quotes/promise";
import { packTrays } from "@/lib/packing/trays";
import { isStaffed } from "@/lib/process/time-zone";
import { finishingQueue } from "@/lib/quotes/finishing-queue";

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
    finishing_lanes: 1,
    finishing_queue: [],
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
    // The wash station is booked from hour 40 to 50 and the furnace from 60 to 80: the lot waits
    // for them, so printing has room to slip and the furnace closes the chain into finishing.
    for (const s of steps) expect(s.slack_min).toBeGreaterThanOrEqual(0);
    for (const s of steps.filter((x) => x.critical)) expect(s.slack_min).toBe(0);
    expect(steps.some((s) => s.critical && s.kind === "print")).toBe(false);
    expect(steps.filter((s) => s.kind === "furnace").every((s) => s.critical)).toBe(true);
    expect(steps.find((s) => s.kind === "finishing")!.critical).toBe(true);
    expect(r.critical_path.at(-1)).toMatch(/^Finish 9/);
  });

  it("in an empty shop the whole chain from the first plate is critical", () => {
    const a = base();
    const r = planPromise({
      ...a,
      printers: a.printers.map((p) => ({ ...p, busy: [] })),
      wash_stations: a.wash_stations.map((w) => ({ ...w, busy: [] })),
      furnaces: a.furnaces.map((f) => ({ ...f, busy: [] })),
    });
    expect(r.feasible).toBe(true);
    if (!r.feasible) return;
    for (const kind of ["print", "wash", "drying", "furnace", "finishing"]) expect(r.steps.some((s) => s.kind === kind && s.critical)).toBe(true);
  });

  it("a fuller schedule never gives an earlier date (monotonicity)", () => {
    const interval = fc.tuple(fc.integer({ min: 0, max: 400 }), fc.integer({ min: 1, max: 40 })).map(([s, d]) => [NOW + s * H, NOW + (s + d) * H] as [number, number]);
    fc.assert(
      fc.property(
        fc.record({
          p1: fc.array(interval, { maxLength: 6 }), p2: fc.array(interval, { maxLength: 6 }), w: fc.array(interval, { maxLength: 6 }), f: fc.array(interval, { maxLength: 6 }),
          // finishing work already queued: released at some hour, some machinist-minutes
          finish: fc.array(fc.record({ release: fc.integer({ min: -48, max: 400 }).map((h) => NOW + h * H), minutes: fc.integer({ min: 1, max: 3000 }) }), { maxLength: 8 }),
        }),
        fc.integer({ min: 1, max: 30 }),
        (extra, q) => {
          const a = base({ start_quantity: q, finish_quantity: q });
          const b: PromiseInput = {
            ...a,
            finishing_queue: extra.finish,
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

  it("fewer machinists or more queued finishing never give an earlier date", () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ release: fc.integer({ min: 0, max: 300 }).map((h) => NOW + h * H), minutes: fc.integer({ min: 1, max: 2000 }) }), { maxLength: 6 }),
        fc.record({ release: fc.integer({ min: 0, max: 300 }).map((h) => NOW + h * H), minutes: fc.integer({ min: 1, max: 2000 }) }),
        fc.integer({ min: 1, max: 4 }),
        fc.integer({ min: 1, max: 30 }),
        (queue, more, lanes, q) => {
          const a = planPromise(base({ start_quantity: q, finish_quantity: q, finishing_queue: queue, finishing_lanes: lanes + 1 }));
          const fewer = planPromise(base({ start_quantity: q, finish_quantity: q, finishing_queue: queue, finishing_lanes: lanes }));
          const fuller = planPromise(base({ start_quantity: q, finish_quantity: q, finishing_queue: [...queue, more], finishing_lanes: lanes + 1 }));
          expect(a.feasible && fewer.feasible && fuller.feasible).toBe(true);
          if (!a.feasible || !fewer.feasible || !fuller.feasible) return;
          expect(Date.parse(fewer.completion)).toBeGreaterThanOrEqual(Date.parse(a.completion));
          expect(Date.parse(fuller.completion)).toBeGreaterThanOrEqual(Date.parse(a.completion));
        },
      ),
      { numRuns: 80 },
    );
  });

  it("a full finishing queue pushes the date, by the hours worked off first", () => {
    // Without a queue: the furnace run ends Fri 11 Dec 12:00, inside the shift (06:00–22:00), so it
    // is unloaded and released to the machinists then; 9 units × 10 min = 90 min end at 13:30.
    // The shop's finishing lead time (1440 min in the seed) is not added on top: that span is
    // the queue and the work themselves, counted once.
    const plain = planPromise(base());
    expect(plain.feasible && plain.completion).toBe("2026-12-11T13:30:00.000Z");
    // 120 h of work waiting now (Mon 7 Dec 08:00) for one machinist, 06:00–22:00 on weekdays:
    // Mon 14 h + Tue–Fri 4 × 16 h = 78 h by Fri 22:00; Mon 14 Dec 16 h → 94 h; Tue 16 h → 110 h;
    // the last 10 h end Wed 16 Dec 16:00. The lot then starts and ends 90 min later, 17:30.
    const full = planPromise(base({ finishing_queue: [{ release: NOW, minutes: 120 * 60 }] }));
    expect(full.feasible).toBe(true);
    if (!full.feasible) return;
    const fin = full.steps.find((s) => s.kind === "finishing")!;
    expect(fin.start).toBe("2026-12-16T16:00:00.000Z");
    expect(full.completion).toBe("2026-12-16T17:30:00.000Z");
    expect(fin.label).toBe("Finish 9 (1 machinist; 120.0 h queued ahead)");
    // The wait is the queue's: Fri 11 Dec 12:00 → Wed 16 Dec 16:00 = 5 days 4 h = 124 h, and it
    // is the furnace run's slack now.
    expect(full.finishing).toMatchObject({ wait_min: 124 * 60, queued_ahead_min: 7200, lanes: 1 });
    for (const s of full.steps.filter((x) => x.kind === "furnace")) {
      expect(s.slack_min).toBe(124 * 60);
      expect(s.critical).toBe(false);
    }
    expect(full.critical_path).toEqual([fin.label]);
    // Two machinists work the 120 h off as 60 h: Mon 14 h + Tue 16 h + Wed 16 h = 46 h, the
    // last 14 h end Thu 10 Dec 20:00, before the lot's release (Fri 12:00); ⌈9 / 2⌉ = 5 units
    // × 10 min = 50 min, so Fri 11 Dec 12:50.
    const two = planPromise(base({ finishing_queue: [{ release: NOW, minutes: 120 * 60 }], finishing_lanes: 2 }));
    expect(two.feasible && two.completion).toBe("2026-12-11T12:50:00.000Z");
  });

  it("says so when the finishing queue alone runs past the horizon", () => {
    // 60 days × 16 h at most are staffed in the 60-day horizon; 1000 h of work cannot fit.
    const r = planPromise(base({ finishing_queue: [{ release: NOW, minutes: 1000 * 60 }] }));
    expect(r).toMatchObject({ feasible: false, step: "finishing" });
    if (!r.feasible) expect(r.reason).toMatch(/60-day planning horizon/);
  });

  it("work released after the lot does not hold it up (first come, first served)", () => {
    const later = planPromise(base({ finishing_queue: [{ release: Date.parse("2026-12-11T12:00:01Z"), minutes: 100 * 60 }] }));
    expect(later.feasible && later.completion).toBe("2026-12-11T13:30:00.000Z");
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

describe("the finishing queue a promise plans behind", () => {
  it("releases waiting units now and units in booked runs when they are unloaded, grouped", () => {
    // A run ending Sat 12 Dec 10:00 is unloaded, and its units released, at the next shift: Mon 14 Dec 06:00.
    const runEnd = Date.parse("2026-12-12T10:00:00Z");
    const jobs = finishingQueue(
      [
        { released: true, run_ends_at: null, minutes: 30 },
        { released: true, run_ends_at: null, minutes: 15 },
        { released: false, run_ends_at: runEnd, minutes: 20 },
        { released: false, run_ends_at: runEnd, minutes: 25 },
        { released: false, run_ends_at: null, minutes: 99 }, // no run booked: not in the queue yet
        { released: true, run_ends_at: null, minutes: 0 }, // nothing to finish
      ],
      NOW,
      staffed,
    );
    expect(jobs).toEqual([
      { release: NOW, minutes: 45 },
      { release: Date.parse("2026-12-14T06:00:00Z"), minutes: 45 },
    ]);
  });
});
