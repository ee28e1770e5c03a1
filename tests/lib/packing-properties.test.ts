import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { canAddToRun, packTrays } from "@/lib/packing/trays";
import type { PackFurnace, PackUnit } from "@/lib/packing/types";
import type { FurnaceRunsInstance } from "@/lib/planning/instances";
import { toInstanceRuns, verifyRuns } from "@/lib/planning/metrics";

const T0 = Date.parse("2027-01-04T06:00:00Z");

const furnaceArb = (i: number) =>
  fc.record({
    tray: fc.tuple(fc.integer({ min: 100, max: 400 }), fc.integer({ min: 100, max: 400 })),
    tray_count: fc.integer({ min: 1, max: 3 }),
    usable_height_mm: fc.integer({ min: 50, max: 200 }),
    max_load_g: fc.integer({ min: 500, max: 20_000 }),
    profiles: fc.subarray(["A", "B"], { minLength: 1 }),
  }).map(
    (f): PackFurnace => ({ id: `F${i}`, tray_mm: f.tray, tray_count: f.tray_count, usable_height_mm: f.usable_height_mm, max_load_g: f.max_load_g, profiles: f.profiles }),
  );

const unitArb = fc.record({
  profile: fc.constantFrom("A", "A", "B", "B", "C"),
  w: fc.double({ min: 5, max: 160, noNaN: true }),
  d: fc.double({ min: 5, max: 160, noNaN: true }),
  h: fc.double({ min: 5, max: 130, noNaN: true }),
  m: fc.double({ min: 0, max: 2000, noNaN: true }),
  dueH: fc.integer({ min: 0, max: 24 * 30 }),
});

const instanceArb = fc
  .record({
    clearance: fc.constantFrom(0, 2, 5, 8.5),
    furnaces: fc.integer({ min: 1, max: 3 }).chain((k) => fc.tuple(...Array.from({ length: k }, (_, i) => furnaceArb(i)))),
    units: fc.array(unitArb, { maxLength: 40 }),
  })
  .map(
    (x): FurnaceRunsInstance => ({
      kind: "furnace-runs",
      name: "prop",
      clearance_mm: x.clearance,
      furnaces: x.furnaces.map((f) => ({ ...f, tray_mm: [f.tray_mm[0], f.tray_mm[1]], profiles: [...f.profiles] })),
      units: x.units.map((u, i) => ({
        id: `u${i}`,
        profile: u.profile,
        footprint_mm: [Math.round(u.w * 10) / 10, Math.round(u.d * 10) / 10],
        height_mm: Math.round(u.h * 10) / 10,
        mass_g: Math.round(u.m),
        due: new Date(T0 + u.dueH * 3_600_000).toISOString(),
      })),
    }),
  );

function allFinite(x: unknown): boolean {
  if (typeof x === "number") return Number.isFinite(x);
  if (Array.isArray(x)) return x.every(allFinite);
  if (x && typeof x === "object") return Object.values(x).every(allFinite);
  return true;
}

describe("tray packing properties", () => {
  it("plans never overlap, keep clearance, stay inside trays and limits, cover every unit, and stay at or above the bound", () => {
    fc.assert(
      fc.property(instanceArb, (inst) => {
        const res = packTrays(inst);
        const check = verifyRuns(inst, toInstanceRuns(res.runs), res.unplaced);
        expect(check.violations).toEqual([]);
        expect(res.runs.length).toBeGreaterThanOrEqual(res.lowerBound.largest);
        expect(res.lowerBound.largest).toBeGreaterThanOrEqual(Math.max(res.lowerBound.area, res.lowerBound.mass, res.lowerBound.count));
        expect(allFinite(res)).toBe(true);
        for (const r of res.runs) {
          expect(r.area_used_fraction).toBeGreaterThan(0);
          expect(r.area_used_fraction).toBeLessThanOrEqual(1);
        }
      }),
      { numRuns: 80 },
    );
  });

  it("a unit canAddToRun accepts yields a run that still checks out", () => {
    fc.assert(
      fc.property(instanceArb, fc.nat(), (inst, pick) => {
        const res = packTrays(inst);
        if (res.runs.length === 0 || inst.units.length === 0) return;
        const run = res.runs[pick % res.runs.length];
        const f = inst.furnaces.find((x) => x.id === run.furnace)!;
        const inRun = new Set(run.trays.flatMap((t) => t.placements.map((p) => p.unit)));
        const candidate = inst.units[pick % inst.units.length];
        if (inRun.has(candidate.id)) return;
        const out = canAddToRun(run, candidate, { furnace: f, clearance_mm: inst.clearance_mm, units: inst.units.filter((u) => inRun.has(u.id)) });
        if (!out.ok) {
          expect(["profile", "height", "load", "room"]).toContain(out.code);
          return;
        }
        const ids = new Set([...inRun, candidate.id]);
        const sub: FurnaceRunsInstance = { ...inst, units: inst.units.filter((u) => ids.has(u.id)) };
        expect(verifyRuns(sub, toInstanceRuns([out.run]), []).violations).toEqual([]);
      }),
      { numRuns: 60 },
    );
  });

  it("identical units are interchangeable: the run count does not depend on their order", () => {
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 30 }), fc.integer({ min: 20, max: 120 }), fc.integer({ min: 20, max: 120 }), (k, w, d) => {
        const mk = (ids: number[]): PackUnit[] => ids.map((i) => ({ id: `s${i}`, profile: "A", footprint_mm: [w, d], height_mm: 10, mass_g: 10, due: "2027-01-10T00:00:00Z" }));
        const furnaces = [{ id: "F", tray_mm: [300, 250] as [number, number], tray_count: 2, usable_height_mm: 50, max_load_g: 1e6, profiles: ["A"] }];
        const a = packTrays({ clearance_mm: 5, furnaces, units: mk([...Array(k).keys()]) });
        const b = packTrays({ clearance_mm: 5, furnaces, units: mk([...Array(k).keys()].reverse()) });
        expect(a.runs.length).toBe(b.runs.length);
      }),
      { numRuns: 30 },
    );
  });
});
