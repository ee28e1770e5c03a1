import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import type { PrinterPlanInstanceInput } from "@/lib/planning/instances";
import { printerPlanInstanceSchema } from "@/lib/planning/instances";
import { verifyPlan } from "@/lib/planning/metrics";
import { planPrinters } from "@/lib/planning/printer-plan";
import { printerPlanInstance } from "@/bench/generate-instances";

// 2027-01-04 is a Monday.
const T0 = Date.parse("2027-01-04T06:00:00Z");
const at = (h: number) => new Date(T0 + h * 3_600_000).toISOString();
type Vol = [number, number, number];

function inst(over: Partial<PrinterPlanInstanceInput> = {}): PrinterPlanInstanceInput {
  return {
    kind: "printer-plan",
    name: "t",
    now: at(0),
    printers: [{ id: "P1", materials: ["M"], build_volume_mm: [300, 250, 150], available_from: at(0), blocked: [] }],
    builds: [],
    ...over,
  };
}
const build = (id: string, hours: number, dueH: number, over: Record<string, unknown> = {}) => ({
  id,
  material: "M",
  size_mm: [100, 100, 50] as Vol,
  duration_min: hours * 60,
  due: at(dueH),
  ...over,
});

describe("compatibility", () => {
  it("lets X and Y swap but keeps Z vertical, and says why a build fits nowhere", () => {
    const res = planPrinters(
      inst({
        builds: [
          build("swap", 1, 10, { size_mm: [250, 290, 100] }),
          build("tall", 1, 10, { size_mm: [100, 100, 151] }),
          build("alien", 1, 10, { material: "Ti" }),
        ],
      }),
    );
    expect(res.assignments.map((a) => a.build)).toEqual(["swap"]);
    const reasons = Object.fromEntries(res.unplaced.map((u) => [u.build, u.reason]));
    expect(reasons.tall).toMatch(/does not fit/);
    expect(reasons.alien).toMatch(/no printer takes material Ti/);
  });

  it("only uses printers that take the material", () => {
    const res = planPrinters(
      inst({
        printers: [
          { id: "P1", materials: ["A"], build_volume_mm: [300, 300, 300], blocked: [] },
          { id: "P2", materials: ["B"], build_volume_mm: [300, 300, 300], blocked: [] },
        ],
        builds: [build("a1", 5, 10, { material: "A" }), build("a2", 5, 10, { material: "A" }), build("b1", 1, 10, { material: "B" })],
      }),
    );
    for (const a of res.assignments) expect(a.printer).toBe(a.build.startsWith("a") ? "P1" : "P2");
    expect(res.metrics.makespan_min).toBe(600);
  });
});

describe("time rules", () => {
  it("keeps builds out of blocked windows and fills the gap before one with a later, shorter build", () => {
    const res = planPrinters(
      inst({
        printers: [{ id: "P1", materials: ["M"], build_volume_mm: [300, 250, 150], available_from: at(0), blocked: [{ start: at(5), end: at(8) }] }],
        builds: [build("long", 10, 20), build("short", 3, 40)],
      }),
    );
    const byId = Object.fromEntries(res.assignments.map((a) => [a.build, a]));
    expect(byId.long.start).toBe(at(8));
    expect(byId.short.start).toBe(at(0));
    expect(res.baseline.makespan_min).toBe(18 * 60);
  });

  it("never starts before the printer is available", () => {
    const res = planPrinters(
      inst({
        printers: [{ id: "P1", materials: ["M"], build_volume_mm: [300, 250, 150], available_from: at(6), blocked: [] }],
        builds: [build("b", 2, 4)],
      }),
    );
    expect(res.assignments[0].start).toBe(at(6));
    expect(res.metrics).toEqual({ makespan_min: 480, max_lateness_min: 240, late_count: 1, total_tardiness_min: 240 });
  });

  it("starts builds only inside staffed hours when the shop sets them", () => {
    // Monday to Friday 06:00–14:00 UTC (day 0 = Sunday).
    const staffed_hours = { timeZone: "UTC", pattern: [1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "14:00" })) };
    const res = planPrinters(inst({ builds: [build("b1", 10, 100), build("b2", 10, 100)], staffed_hours }));
    const starts = res.assignments.map((a) => a.start).sort();
    expect(starts).toEqual([at(0), at(24)]);
    expect(verifyPlan(printerPlanInstanceSchema.parse(inst({ builds: [build("b1", 10, 100), build("b2", 10, 100)], staffed_hours })), res.assignments).ok).toBe(true);
    // In a zone east of UTC the same wall-clock hours are earlier in UTC.
    const berlin = planPrinters(
      inst({
        now: "2027-01-04T04:00:00Z",
        printers: [{ id: "P1", materials: ["M"], build_volume_mm: [300, 250, 150], blocked: [] }],
        builds: [build("b", 1, 100)],
        staffed_hours: { ...staffed_hours, timeZone: "Europe/Berlin" },
      }),
    );
    expect(berlin.assignments[0].start).toBe("2027-01-04T05:00:00.000Z");
  });
});

describe("lower bound", () => {
  it("adds blocked time to the load bound", () => {
    // 2 × 10 h of work on one printer blocked 12–17 h: nothing can end before 25 h.
    const res = planPrinters(
      inst({
        printers: [{ id: "P1", materials: ["M"], build_volume_mm: [300, 250, 150], blocked: [{ start: at(12), end: at(17) }] }],
        builds: [build("b1", 10, 100), build("b2", 10, 100)],
      }),
    );
    expect(res.lowerBound).toEqual({ makespan_min: 25 * 60, single_min: 10 * 60, load_min: 25 * 60 });
    expect(res.metrics.makespan_min).toBe(27 * 60);
  });

  it("uses the printers a group of builds is confined to", () => {
    // Material A only on P1 (12 h of it); B on both. The all-printer bound is (12+4)/2 = 8 h, the A bound 12 h.
    const res = planPrinters(
      inst({
        printers: [
          { id: "P1", materials: ["A", "B"], build_volume_mm: [300, 300, 300], blocked: [] },
          { id: "P2", materials: ["B"], build_volume_mm: [300, 300, 300], blocked: [] },
        ],
        builds: [build("a1", 6, 50, { material: "A" }), build("a2", 6, 50, { material: "A" }), build("b1", 4, 50, { material: "B" })],
      }),
    );
    expect(res.lowerBound.load_min).toBe(12 * 60);
    expect(res.metrics.makespan_min).toBe(12 * 60);
  });
});

describe("improvement over plain EDD", () => {
  it("never worsens the maximum lateness and never beats the bound", () => {
    for (const seed of [1, 2]) {
      const i = printerPlanInstance(seed, 120, 5);
      const res = planPrinters(i);
      expect(res.metrics.max_lateness_min!).toBeLessThanOrEqual(res.baseline.max_lateness_min! + 1e-9);
      expect(res.metrics.makespan_min).toBeLessThanOrEqual(res.baseline.makespan_min);
      expect(res.metrics.makespan_min).toBeGreaterThanOrEqual(res.lowerBound.makespan_min - 1e-9);
      expect(verifyPlan(i, res.assignments, res.unplaced)).toEqual({ ok: true, violations: [] });
    }
  });

  it("improve: false returns the plain EDD list schedule", () => {
    const i = printerPlanInstance(3, 60, 4);
    const res = planPrinters(i, { improve: false });
    expect(res.metrics).toEqual(res.baseline);
    expect(res.moves).toBe(0);
  });

  it("an empty queue has a zero makespan and no lateness", () => {
    const res = planPrinters(inst());
    expect(res.metrics).toEqual({ makespan_min: 0, max_lateness_min: null, late_count: 0, total_tardiness_min: 0 });
    expect(res.lowerBound.makespan_min).toBe(0);
  });

  it("rejects duplicate ids and malformed instances", () => {
    expect(() => planPrinters(inst({ builds: [build("x", 1, 2), build("x", 1, 2)] }))).toThrow(/twice/);
    expect(() => planPrinters({ ...inst(), now: "yesterday" })).toThrow();
    expect(() => planPrinters(inst({ builds: [build("neg", -1, 2)] }))).toThrow();
  });
});

const SHARED = path.resolve(process.cwd(), "../shared/bench/instances");

describe.skipIf(!fs.existsSync(SHARED))("shared printer sample", () => {
  it("parses, plans and checks out", () => {
    for (const f of fs.readdirSync(SHARED).filter((x) => x.endsWith(".json"))) {
      const raw = JSON.parse(fs.readFileSync(path.join(SHARED, f), "utf8"));
      if (raw.kind !== "printer-plan") continue;
      const i = printerPlanInstanceSchema.parse(raw);
      const res = planPrinters(i);
      expect(verifyPlan(i, res.assignments, res.unplaced)).toEqual({ ok: true, violations: [] });
      expect(res.metrics.makespan_min).toBeGreaterThanOrEqual(res.lowerBound.makespan_min - 1e-9);
      expect(res.metrics.max_lateness_min!).toBeLessThanOrEqual(res.baseline.max_lateness_min! + 1e-9);
    }
  });
});
