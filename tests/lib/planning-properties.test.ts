import fc from "fast-check";
import { describe, expect, it } from "vitest";
import type { PrinterPlanInstance } from "@/lib/planning/instances";
import { verifyPlan } from "@/lib/planning/metrics";
import { planPrinters } from "@/lib/planning/printer-plan";

const T0 = Date.parse("2027-01-04T06:00:00Z");
const at = (h: number) => new Date(T0 + h * 3_600_000).toISOString();
const MATERIALS = ["M1", "M2", "M3"];

const printerArb = (i: number) =>
  fc.record({
    materials: fc.subarray(MATERIALS, { minLength: 1 }),
    vol: fc.tuple(fc.integer({ min: 100, max: 350 }), fc.integer({ min: 100, max: 350 }), fc.integer({ min: 80, max: 300 })),
    availH: fc.integer({ min: -10, max: 48 }),
    blocked: fc.array(fc.tuple(fc.integer({ min: -20, max: 300 }), fc.integer({ min: 1, max: 30 })), { maxLength: 3 }),
  }).map((p) => ({
    id: `P${i}`,
    materials: p.materials,
    build_volume_mm: p.vol as [number, number, number],
    available_from: at(p.availH),
    blocked: p.blocked.map(([s, len]) => ({ start: at(s), end: at(s + len) })),
  }));

const buildArb = fc.record({
  material: fc.constantFrom(...MATERIALS),
  size: fc.tuple(fc.integer({ min: 10, max: 360 }), fc.integer({ min: 10, max: 360 }), fc.integer({ min: 10, max: 300 })),
  duration: fc.integer({ min: 20, max: 3000 }),
  dueH: fc.integer({ min: 0, max: 400 }),
});

const staffedArb = fc.option(
  fc.constantFrom(
    { timeZone: "UTC", pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })) },
    { timeZone: "America/Chicago", pattern: [0, 1, 2, 3, 4, 5, 6].map((day) => ({ day, start: "22:00", end: "06:00" })) },
  ),
  { nil: undefined },
);

const instanceArb = fc
  .record({
    printers: fc.integer({ min: 1, max: 4 }).chain((k) => fc.tuple(...Array.from({ length: k }, (_, i) => printerArb(i)))),
    builds: fc.array(buildArb, { maxLength: 25 }),
    staffed: staffedArb,
  })
  .map(
    (x): PrinterPlanInstance => ({
      kind: "printer-plan",
      name: "prop",
      now: at(0),
      printers: x.printers,
      builds: x.builds.map((b, i) => ({ id: `b${i}`, material: b.material, size_mm: b.size, duration_min: b.duration, due: at(b.dueH) })),
      staffed_hours: x.staffed,
    }),
  );

describe("printer plan properties", () => {
  it("never double-books, never touches a blocked window, respects compatibility and staffed starts, covers every build", () => {
    fc.assert(
      fc.property(instanceArb, (inst) => {
        const res = planPrinters(inst);
        expect(verifyPlan(inst, res.assignments, res.unplaced).violations).toEqual([]);
        expect(verifyPlan(inst, res.assignments.length ? res.assignments : [], res.unplaced).ok).toBe(true);
      }),
      { numRuns: 80 },
    );
  });

  it("stays at or above its lower bound, keeps EDD's maximum lateness, and reports no NaN", () => {
    fc.assert(
      fc.property(instanceArb, (inst) => {
        const res = planPrinters(inst);
        const nums = [
          res.metrics.makespan_min,
          res.metrics.total_tardiness_min,
          res.lowerBound.makespan_min,
          res.lowerBound.load_min,
          res.lowerBound.single_min,
          res.baseline.makespan_min,
        ];
        for (const x of nums) expect(Number.isFinite(x)).toBe(true);
        expect(res.metrics.makespan_min).toBeGreaterThanOrEqual(res.lowerBound.makespan_min - 1e-6);
        expect(res.metrics.makespan_min).toBeLessThanOrEqual(res.baseline.makespan_min + 1e-6);
        if (res.assignments.length > 0) {
          expect(Number.isFinite(res.metrics.max_lateness_min!)).toBe(true);
          expect(res.metrics.max_lateness_min!).toBeLessThanOrEqual(res.baseline.max_lateness_min! + 1e-6);
        } else {
          expect(res.metrics.max_lateness_min).toBeNull();
        }
      }),
      { numRuns: 80 },
    );
  });
});
