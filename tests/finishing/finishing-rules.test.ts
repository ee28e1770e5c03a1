import { describe, expect, it } from "vitest";
import { availableActions, planFinishingChange } from "@/lib/finishing/transitions";
import { realizedPerAxis, runoutStockCheck, sizeDeviations, stockLeft, toStoredReadings, toleranceSummary, type PartForFinishing } from "@/lib/finishing/inspection";
import { createInspectionSchema, finishingActionSchema } from "@/lib/finishing/schemas";

const part: PartForFinishing = {
  nominal_x_mm: 25, nominal_y_mm: 40, nominal_z_mm: 12,
  stock_x_neg_mm: 0.25, stock_x_pos_mm: 0.25, stock_y_neg_mm: 0.3, stock_y_pos_mm: 0.2, stock_z_neg_mm: 0, stock_z_pos_mm: 0.25,
  tolerance_um: null, tolerance_grade: "IT6", target_ra_um: 0.8,
};
const UNIT = "7d3c1c0e-5a4b-4c1e-9f6a-2b8d3e4f5a6b";

describe("the finishing state machine", () => {
  const passed = { id: "i1", passed: true, reason: null };
  const failed = { id: "i2", passed: false, reason: "bore 0.04 mm oversize" };

  it("goes ready_for_finishing → finishing → done, and only that way", () => {
    expect(planFinishingChange({ state: "ready_for_finishing", held_from: null }, "accept", null).to).toBe("finishing");
    expect(planFinishingChange({ state: "finishing", held_from: null }, "finish", passed).to).toBe("done");
    expect(() => planFinishingChange({ state: "sintered", held_from: null }, "accept", null)).toThrow(/ready for finishing/);
    expect(() => planFinishingChange({ state: "ready_for_finishing", held_from: null }, "finish", passed)).toThrow(/in finishing/);
    expect(() => planFinishingChange({ state: "done", held_from: null }, "accept", null)).toThrow();
  });

  it("finishes only on a passed inspection, scraps only on a failed one", () => {
    const inFinishing = { state: "finishing" as const, held_from: null };
    expect(() => planFinishingChange(inFinishing, "finish", null)).toThrow(/Record an inspection/);
    expect(() => planFinishingChange(inFinishing, "finish", failed)).toThrow(/failed/);
    const scrap = planFinishingChange(inFinishing, "scrap", failed);
    expect(scrap).toMatchObject({ to: "scrapped", scrap_reason: "out_of_tolerance", scrap_note: "bore 0.04 mm oversize" });
    expect(() => planFinishingChange(inFinishing, "scrap", passed)).toThrow(/failed inspection/);
  });

  it("holds with a reason and releases back to where the unit was", () => {
    expect(() => planFinishingChange({ state: "finishing", held_from: null }, "hold", null)).toThrow(/why/);
    const hold = planFinishingChange({ state: "finishing", held_from: null }, "hold", null, "waiting for a gauge");
    expect(hold).toMatchObject({ to: "on_hold", held_from: "finishing", hold_reason: "waiting for a gauge" });
    expect(planFinishingChange({ state: "on_hold", held_from: "finishing" }, "release", null).to).toBe("finishing");
    // a unit held after a wash is not the machinist's to release
    expect(() => planFinishingChange({ state: "on_hold", held_from: "brown" }, "release", null)).toThrow();
  });

  it("offers the buttons that fit the unit", () => {
    expect(availableActions({ state: "ready_for_finishing", held_from: null }, null)).toEqual(["accept", "hold"]);
    expect(availableActions({ state: "finishing", held_from: null }, passed)).toEqual(["finish", "hold"]);
    expect(availableActions({ state: "finishing", held_from: null }, failed)).toEqual(["scrap", "hold"]);
    expect(availableActions({ state: "on_hold", held_from: "ready_for_finishing" }, null)).toEqual(["release"]);
  });

  it("needs a reason to put a unit on hold at the API too", () => {
    const r = finishingActionSchema.safeParse({ action: "hold", version: 3 });
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual(["reason"]);
  });
});

describe("inspection readings", () => {
  it("stores inch readings in mm and µin in µm, exactly (1 in = 25.4 mm; 1 µin = 0.0254 µm, NIST SP 811 B.8)", () => {
    const input = createInspectionSchema.parse({
      unit_id: UNIT, version: 1, units: "in", passed: true,
      green: { x: 1.25 }, sintered: { x: 1.05 }, finished: { x: 1 }, ra: 125, runout: 0.002, runout_axis: "x",
    });
    const stored = toStoredReadings(input);
    expect(stored.green.x).toBe(31.75);
    expect(stored.finished.x).toBe(25.4);
    expect(stored.ra_um).toBe(3.175); // 125 µin is 3.175 µm exactly, not the 3.2 µm ladder rung
    expect(stored.runout_mm).toBeCloseTo(0.0508, 12);
  });

  it("refuses a failed inspection without a reason, runout without an axis and swapped readings", () => {
    const r = createInspectionSchema.safeParse({ unit_id: UNIT, version: 1, units: "mm", passed: false, runout: 0.02, green: { z: 20 }, sintered: { z: 24 } });
    expect(r.success).toBe(false);
    const paths = r.error!.issues.map((i) => i.path.join("."));
    expect(paths).toEqual(expect.arrayContaining(["reason", "runout_axis", "sintered.z"]));
    const empty = createInspectionSchema.safeParse({ unit_id: UNIT, version: 1, units: "mm", passed: true });
    expect(empty.error!.issues[0].message).toMatch(/at least one measurement/);
  });

  it("gives realized shrinkage where both green and sintered sizes are known", () => {
    expect(realizedPerAxis({ x: 30, z: 15 }, { x: 25.2, y: 40 })).toEqual({ x: 1 - 25.2 / 30 });
  });
});

describe("stock left and the runout check", () => {
  it("takes measured stock from the as-sintered size, else the thinner planned face", () => {
    expect(stockLeft(part, "x", 25.5)).toEqual({ axis: "x", perSideMm: 0.25, source: "measured" });
    expect(stockLeft(part, "y")).toEqual({ axis: "y", perSideMm: 0.2, source: "planned" });
  });

  it("warns when runout leaves too little stock to clean up (eccentricity TIR/2 plus margin)", () => {
    // 0.25 mm per side: a 0.3 mm TIR runout is 0.15 mm off centre, +0.05 margin = 0.2 → ok
    expect(runoutStockCheck(part, "x", 0.3, 25.5).status).toBe("ok");
    // 0.45 mm TIR → 0.225 + 0.05 = 0.275 > 0.25 → warning, 0.025 mm short
    const w = runoutStockCheck(part, "x", 0.45, 25.5);
    expect(w.status).toBe("warning");
    expect(w.shortByMm).toBeCloseTo(0.025, 12);
    // sintered under nominal: nothing left at all
    const under = runoutStockCheck(part, "x", 0.01, 24.9);
    expect(under).toMatchObject({ status: "warning", underSize: true });
    expect(under.message).toMatch(/under nominal/);
  });
});

describe("tolerances", () => {
  it("reads an ISO 286-1 grade as µm per nominal size (IT6: 13 µm over 18–30 mm, 16 µm over 30–50, 11 µm over 10–18)", () => {
    expect(toleranceSummary(part)).toEqual({ kind: "grade", grade: "IT6", perAxisUm: { x: 13, y: 16, z: 11 }, beyondTable: [] });
  });

  it("judges a ± tolerance and only reports deviation for a grade", () => {
    const pm = { ...part, tolerance_grade: null, tolerance_um: 20 };
    expect(toleranceSummary(pm)).toEqual({ kind: "plus_minus", um: 20 });
    const d = sizeDeviations(pm, { x: 25.015, y: 40.03 });
    expect(d.map((x) => x.withinPlusMinus)).toEqual([true, false]);
    expect(d[1].deviationUm).toBeCloseTo(30, 9);
    expect(sizeDeviations(part, { x: 25.015 })[0].withinPlusMinus).toBeUndefined();
  });
});
