import { describe, expect, it } from "vitest";
import type { PackFurnace } from "@/lib/packing/types";
import { planFurnaceRuns, type FurnacePlanUnit } from "@/lib/planning/furnace-plan";
import type { FurnaceRunsInstance } from "@/lib/planning/instances";
import { verifyRuns } from "@/lib/planning/metrics";
import { furnaceMixInstance } from "@/bench/generate-instances";

const T0 = Date.parse("2027-01-04T06:00:00Z");
const at = (h: number) => new Date(T0 + h * 3_600_000).toISOString();

const F = (id: string, over: Partial<PackFurnace> = {}): PackFurnace => ({
  id,
  tray_mm: [300, 250],
  tray_count: 2,
  usable_height_mm: 120,
  max_load_g: 3000,
  profiles: ["H13-std", "174PH-std"],
  ...over,
});

let k = 0;
const U = (over: Partial<FurnacePlanUnit> = {}): FurnacePlanUnit => ({
  id: `u${k++}`,
  profile: "H13-std",
  footprint_mm: [60, 40],
  height_mm: 30,
  mass_g: 500,
  due: at(48),
  ...over,
});

const overlaps = (a: { start: string; end: string }, b: { start: string; end: string }) =>
  Date.parse(a.start) < Date.parse(b.end) && Date.parse(b.start) < Date.parse(a.end);

describe("planFurnaceRuns", () => {
  it("books each run for its profile's cycle, after its units are brown, clear of bookings and of each other", () => {
    const units = [
      ...Array.from({ length: 8 }, () => U()),
      ...Array.from({ length: 3 }, () => U({ profile: "174PH-std", ready_at: at(10) })),
    ];
    const bookings = [{ furnace: "F1", start: at(0), end: at(5) }];
    const res = planFurnaceRuns({
      now: at(0),
      clearance_mm: 5,
      furnaces: [F("F1")],
      units,
      cycle_min: { "H13-std": 1200, "174PH-std": 900 },
      bookings,
    });
    // 8 × 500 g of H13 on a 3 kg furnace: 2 runs; the 17-4PH run is a third.
    expect(res.metrics.run_count).toBe(3);
    expect(res.metrics.lower_bound).toBe(3);
    for (const r of res.runs) {
      const len = (Date.parse(r.end) - Date.parse(r.start)) / 60_000;
      expect(len).toBe(r.profile === "H13-std" ? 1200 : 900);
      expect(Date.parse(r.start)).toBeGreaterThanOrEqual(Date.parse(r.ready_at));
      for (const b of bookings) expect(overlaps(r, b)).toBe(false);
    }
    for (let i = 0; i < res.runs.length; i++) for (let j = i + 1; j < res.runs.length; j++) {
      if (res.runs[i].furnace === res.runs[j].furnace) expect(overlaps(res.runs[i], res.runs[j])).toBe(false);
    }
    const ph = res.runs.find((r) => r.profile === "174PH-std")!;
    expect(Date.parse(ph.start)).toBeGreaterThanOrEqual(Date.parse(at(10)));
    // The last run ends at 5 h + 20 h + 20 h (two H13 runs) or after the 17-4PH run.
    expect(res.metrics.makespan_min).toBe(Math.max(...res.runs.map((r) => (Date.parse(r.end) - T0) / 60_000)));
    const f1 = F("F1");
    const inst: FurnaceRunsInstance = {
      kind: "furnace-runs",
      name: "t",
      clearance_mm: 5,
      furnaces: [{ ...f1, tray_mm: [f1.tray_mm[0], f1.tray_mm[1]], profiles: [...f1.profiles] }],
      units: units.map((u) => ({ ...u, footprint_mm: [u.footprint_mm[0], u.footprint_mm[1]], due: u.due! })),
    };
    const placed = res.runs.map((r) => ({ furnace: r.furnace, profile: r.profile, placements: r.trays.flatMap((t) => t.placements.map((p) => ({ unit: p.unit, tray: t.index, x: p.x, y: p.y, rotated: p.rotated }))) }));
    expect(verifyRuns(inst, placed, res.unplaced).violations).toEqual([]);
  });

  it("keeps soon-brown units out of the run that can start now", () => {
    // 3 kg per run, 500 g units: two runs of three. a, c, e are brown only in 48 h.
    const units = ["a", "b", "c", "d", "e", "f"].map((id, i) => U({ id, due: at(30), ready_at: i % 2 === 0 ? at(48) : null, mass_g: 1000 }));
    const res = planFurnaceRuns({ now: at(0), clearance_mm: 5, furnaces: [F("F1")], units, cycle_min: { "H13-std": 600 } });
    expect(res.runs).toHaveLength(2);
    const withB = res.runs.find((r) => r.trays.some((t) => t.placements.some((p) => p.unit === "b")))!;
    expect(withB.start).toBe(at(0));
    expect(withB.trays.flatMap((t) => t.placements.map((p) => p.unit)).sort()).toEqual(["b", "d", "f"]);
    // Lateness is still measured against the real due dates.
    expect(res.metrics.max_lateness_min).toBe((48 + 10 - 30) * 60);
  });

  it("moves a run to another furnace that holds the same layout when its own is booked", () => {
    const res = planFurnaceRuns({
      now: at(0),
      clearance_mm: 5,
      furnaces: [F("F1"), F("F2", { tray_mm: [320, 260], tray_count: 3 })],
      units: [U(), U()],
      cycle_min: { "H13-std": 600 },
      bookings: [{ furnace: "F1", start: at(0), end: at(100) }],
    });
    expect(res.runs).toHaveLength(1);
    expect(res.runs[0].furnace).toBe("F2");
    expect(res.runs[0].start).toBe(at(0));
    expect(res.runs[0].trays).toHaveLength(3);
  });

  it("reports lateness against the run's end, and units without a cycle time as unplaced", () => {
    const res = planFurnaceRuns({
      now: at(0),
      clearance_mm: 5,
      furnaces: [F("F1")],
      units: [U({ due: at(5) }), U({ profile: "174PH-std" })],
      cycle_min: { "H13-std": 600 },
    });
    expect(res.metrics.max_lateness_min).toBe(300);
    expect(res.metrics.late_count).toBe(1);
    expect(res.unplaced).toEqual([expect.objectContaining({ code: "no_profile" })]);
  });

  it("loads only in staffed hours when the shop sets them", () => {
    const res = planFurnaceRuns({
      now: "2027-01-04T20:00:00Z",
      clearance_mm: 5,
      furnaces: [F("F1")],
      units: [U()],
      cycle_min: { "H13-std": 600 },
      staffed_hours: { timeZone: "UTC", pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "18:00" })) },
    });
    expect(res.runs[0].start).toBe("2027-01-05T06:00:00.000Z");
  });

  it("handles a realistic queue in well under a second", () => {
    const mix = furnaceMixInstance(7, 400);
    const t0 = performance.now();
    const res = planFurnaceRuns({
      now: at(0),
      clearance_mm: mix.clearance_mm,
      furnaces: mix.furnaces,
      units: mix.units.map((u, i) => ({ ...u, ready_at: i % 3 === 0 ? at(12) : null })),
      cycle_min: { "H13-std": 1300, "174PH-std": 1100, "316L-std": 1250, "A2-std": 1400 },
    });
    expect(performance.now() - t0).toBeLessThan(5000);
    expect(res.metrics.run_count).toBeGreaterThanOrEqual(res.metrics.lower_bound);
    expect(res.unplaced).toEqual([]);
  });

  it("rejects a cycle time that is not a positive number", () => {
    expect(() => planFurnaceRuns({ now: at(0), clearance_mm: 5, furnaces: [F("F1")], units: [], cycle_min: { "H13-std": 0 } })).toThrow();
    expect(() => planFurnaceRuns({ now: at(0), clearance_mm: 5, furnaces: [F("F1")], units: [], cycle_min: {}, bookings: [{ furnace: "X", start: at(0), end: at(1) }] })).toThrow();
  });
});
