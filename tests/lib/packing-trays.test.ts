import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { ComputationError } from "@/lib/errors";
import { canAddToRun, packTrays } from "@/lib/packing/trays";
import type { PackFurnace, PackUnit } from "@/lib/packing/types";
import { furnaceRunsInstanceSchema, planningInstanceSchema } from "@/lib/planning/instances";
import { toInstanceRuns, verifyRuns } from "@/lib/planning/metrics";
import { sharedFolder } from "@/tests/helpers/shared";

const DAY = 86_400_000;
const T0 = Date.parse("2027-01-04T06:00:00Z");
const due = (days: number) => new Date(T0 + days * DAY).toISOString();

const furnace = (over: Partial<PackFurnace> = {}): PackFurnace => ({
  id: "F1",
  tray_mm: [300, 250],
  tray_count: 1,
  usable_height_mm: 100,
  max_load_g: 100_000,
  profiles: ["P"],
  ...over,
});

let n = 0;
const unit = (over: Partial<PackUnit> = {}): PackUnit => ({
  id: `u${n++}`,
  profile: "P",
  footprint_mm: [50, 40],
  height_mm: 30,
  mass_g: 100,
  due: due(5),
  ...over,
});

function allFinite(x: unknown): boolean {
  if (typeof x === "number") return Number.isFinite(x);
  if (Array.isArray(x)) return x.every(allFinite);
  if (x && typeof x === "object") return Object.values(x).every(allFinite);
  return true;
}

describe("clearance model", () => {
  it("n units in a row need n·(w + c) + c of tray", () => {
    // 2 × 135 + 3 × 10 = 300: both fit on one tray exactly; on a 299 mm tray they do not.
    const units = [unit({ id: "a", footprint_mm: [135, 50] }), unit({ id: "b", footprint_mm: [135, 50] })];
    const fit = packTrays({ clearance_mm: 10, furnaces: [furnace({ tray_mm: [300, 100] })], units });
    expect(fit.runs).toHaveLength(1);
    const [p, q] = fit.runs[0].trays[0].placements.sort((s, t) => s.x - t.x);
    expect(p.x).toBeCloseTo(10, 1);
    expect(q.x - (p.x + p.w)).toBeGreaterThanOrEqual(10 - 0.011);
    expect(q.x + q.w).toBeLessThanOrEqual(290 + 0.011);
    const tight = packTrays({ clearance_mm: 10, furnaces: [furnace({ tray_mm: [299, 100] })], units });
    expect(tight.runs).toHaveLength(2);
  });

  it("a unit wider than the tray minus two clearances is reported, not dropped", () => {
    const res = packTrays({ clearance_mm: 10, furnaces: [furnace({ tray_mm: [300, 100] })], units: [unit({ id: "w", footprint_mm: [281, 50] })] });
    expect(res.runs).toHaveLength(0);
    expect(res.unplaced).toEqual([expect.objectContaining({ unit: "w", code: "too_large" })]);
  });

  it("turns a unit 90° when only that fits", () => {
    const res = packTrays({ clearance_mm: 0, furnaces: [furnace({ tray_mm: [100, 300] })], units: [unit({ id: "r", footprint_mm: [200, 50] })] });
    const p = res.runs[0].trays[0].placements[0];
    expect(p).toMatchObject({ unit: "r", rotated: true, w: 50, d: 200 });
  });
});

describe("run rules", () => {
  it("keeps one sinter profile per run", () => {
    const units = [unit({ profile: "P" }), unit({ profile: "Q" }), unit({ profile: "P" })];
    const res = packTrays({ clearance_mm: 5, furnaces: [furnace({ profiles: ["P", "Q"] })], units });
    expect(res.runs).toHaveLength(2);
    for (const r of res.runs) {
      const ids = r.trays.flatMap((t) => t.placements.map((p) => p.unit));
      for (const id of ids) expect(units.find((u) => u.id === id)!.profile).toBe(r.profile);
    }
    expect(res.lowerBound.largest).toBe(2);
  });

  it("respects the load limit and height limit, choosing the furnace that can take a tall unit", () => {
    const heavy = Array.from({ length: 4 }, () => unit({ mass_g: 400 }));
    const res = packTrays({ clearance_mm: 5, furnaces: [furnace({ max_load_g: 1000 })], units: heavy });
    expect(res.runs).toHaveLength(2);
    for (const r of res.runs) expect(r.mass_g).toBeLessThanOrEqual(1000);
    expect(res.lowerBound.mass).toBe(2);

    const tall = unit({ id: "tall", height_mm: 150 });
    const two = packTrays({
      clearance_mm: 5,
      furnaces: [furnace({ id: "low" }), furnace({ id: "high", usable_height_mm: 200 })],
      units: [tall, unit()],
    });
    const run = two.runs.find((r) => r.trays.some((t) => t.placements.some((p) => p.unit === "tall")))!;
    expect(run.furnace).toBe("high");
    expect(run.tallest_mm).toBe(150);
  });

  it("reports each kind of unit that fits no furnace, with its reason", () => {
    const furnaces = [
      furnace({ id: "small", tray_mm: [100, 100], usable_height_mm: 200, max_load_g: 5000 }),
      furnace({ id: "big", tray_mm: [400, 400], usable_height_mm: 50, max_load_g: 5000 }),
    ];
    const units = [
      unit({ id: "nop", profile: "X" }),
      unit({ id: "tall", height_mm: 300 }),
      unit({ id: "wide", footprint_mm: [450, 20], height_mm: 20 }),
      unit({ id: "heavy", mass_g: 6000 }),
      unit({ id: "both", footprint_mm: [200, 200], height_mm: 120 }),
      unit({ id: "fine" }),
    ];
    const res = packTrays({ clearance_mm: 5, furnaces, units });
    const codes = Object.fromEntries(res.unplaced.map((u) => [u.unit, u.code]));
    expect(codes).toEqual({ nop: "no_profile", tall: "too_tall", wide: "too_large", heavy: "too_heavy", both: "no_single_furnace" });
    for (const u of res.unplaced) expect(u.reason.length).toBeGreaterThan(10);
    expect(res.runs).toHaveLength(1);
  });

  it("puts the urgent units in the first run when the count allows", () => {
    const late = Array.from({ length: 3 }, (_, i) => unit({ id: `late${i}`, mass_g: 500, due: due(20) }));
    const early = Array.from({ length: 3 }, (_, i) => unit({ id: `early${i}`, mass_g: 500, due: due(1 + i) }));
    const res = packTrays({ clearance_mm: 5, furnaces: [furnace({ max_load_g: 1500 })], units: [...late, ...early] });
    expect(res.runs).toHaveLength(2);
    const first = res.runs[0].trays.flatMap((t) => t.placements.map((p) => p.unit)).sort();
    expect(first).toEqual(["early0", "early1", "early2"]);
  });

  it("rejects impossible inputs instead of returning NaN", () => {
    expect(() => packTrays({ clearance_mm: 5, furnaces: [furnace()], units: [unit({ footprint_mm: [-1, 5] })] })).toThrow(ComputationError);
    expect(() => packTrays({ clearance_mm: -1, furnaces: [furnace()], units: [] })).toThrow(ComputationError);
    expect(() => packTrays({ clearance_mm: 5, furnaces: [furnace({ tray_count: 0 })], units: [] })).toThrow(ComputationError);
    expect(() => packTrays({ clearance_mm: 5, furnaces: [furnace()], units: [unit({ id: "x" }), unit({ id: "x" })] })).toThrow(ComputationError);
    expect(() => packTrays({ clearance_mm: 5, furnaces: [furnace()], units: [unit({ due: "soon" })] })).toThrow(ComputationError);
  });

  it("an empty queue gives no runs and a zero bound", () => {
    const res = packTrays({ clearance_mm: 5, furnaces: [furnace()], units: [] });
    expect(res).toEqual({ runs: [], unplaced: [], lowerBound: { area: 0, mass: 0, count: 0, shape: 0, sharing: 0, largest: 0 } });
  });
});

describe("canAddToRun", () => {
  const f = furnace({ tray_count: 2, max_load_g: 2000, usable_height_mm: 80 });
  const base = [unit({ id: "a", footprint_mm: [140, 100] }), unit({ id: "b", footprint_mm: [140, 100] })];
  const packed = packTrays({ clearance_mm: 5, furnaces: [f], units: base });
  const run = packed.runs[0];
  const ctx = { furnace: f, clearance_mm: 5, units: base };

  it("says why a unit cannot join", () => {
    expect(canAddToRun(run, unit({ profile: "Q" }), ctx)).toMatchObject({ ok: false, code: "profile" });
    expect(canAddToRun(run, unit({ height_mm: 81 }), ctx)).toMatchObject({ ok: false, code: "height" });
    expect(canAddToRun(run, unit({ mass_g: 1801 }), ctx)).toMatchObject({ ok: false, code: "load" });
    expect(canAddToRun(run, unit({ footprint_mm: [400, 10] }), ctx)).toMatchObject({ ok: false, code: "room" });
  });

  it("finds room beside the present layout and keeps it", () => {
    const res = canAddToRun(run, unit({ id: "c", footprint_mm: [40, 40] }), ctx);
    expect(res.ok).toBe(true);
    if (!res.ok) return;
    expect(res.repacked).toBe(false);
    const before = run.trays.flatMap((t) => t.placements);
    const after = res.run.trays.flatMap((t) => t.placements);
    for (const p of before) expect(after).toContainEqual(p);
    expect(after).toHaveLength(3);
  });

  it("re-packs when the unit only fits in a different layout, and refuses when nothing works", () => {
    // One 300×250 tray: a 180×110 unit sits in the corner; a second one only fits if the first moves.
    const one = furnace({ tray_count: 1 });
    const first = unit({ id: "m1", footprint_mm: [180, 110] });
    const skewed = {
      furnace: "F1",
      profile: "P",
      trays: [{ index: 0, placements: [{ unit: "m1", x: 60, y: 70, w: 180, d: 110, rotated: false }] }],
      mass_g: 100,
      tallest_mm: 30,
      area_used_fraction: 0.26,
    };
    const res = canAddToRun(skewed, unit({ id: "m2", footprint_mm: [180, 110] }), { furnace: one, clearance_mm: 5, units: [first] });
    expect(res).toMatchObject({ ok: true, repacked: true });
    const full = canAddToRun(skewed, unit({ id: "m3", footprint_mm: [290, 200] }), { furnace: one, clearance_mm: 5, units: [first] });
    expect(full).toMatchObject({ ok: false, code: "room" });
  });
});

// Beside the repository, or the machine-wide copy (tests/helpers/shared.ts); skipped when neither exists.
const SHARED = sharedFolder("bench/instances") ?? "";

describe.skipIf(SHARED === "")("shared sample instances", () => {
  const files = SHARED ? fs.readdirSync(SHARED).filter((f) => f.endsWith(".json")) : [];

  it("all parse with the instance schema", () => {
    expect(files.length).toBeGreaterThan(0);
    for (const f of files) planningInstanceSchema.parse(JSON.parse(fs.readFileSync(path.join(SHARED, f), "utf8")));
  });

  it("furnace-run samples pack into plans that check out, at or above the bound", () => {
    for (const f of files) {
      const raw = JSON.parse(fs.readFileSync(path.join(SHARED, f), "utf8"));
      if (raw.kind !== "furnace-runs") continue;
      const inst = furnaceRunsInstanceSchema.parse(raw);
      const res = packTrays(inst);
      expect(verifyRuns(inst, toInstanceRuns(res.runs), res.unplaced)).toEqual({ ok: true, violations: [] });
      expect(res.runs.length).toBeGreaterThanOrEqual(res.lowerBound.largest);
      expect(allFinite(res)).toBe(true);
      if (typeof raw.known_optimum_runs === "number") expect(res.runs.length).toBe(raw.known_optimum_runs);
    }
  });
});
