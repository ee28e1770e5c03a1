import { describe, expect, it } from "vitest";
import { availableActions, planFinishingChange } from "@/lib/finishing/transitions";
import { plannedGreen, realizedPerAxis, runoutStockCheck, sizeDeviations, stockLeft, toStoredReadings, toleranceSummary, type PartForFinishing } from "@/lib/finishing/inspection";
import { ATTACHMENT_MAX_BYTES, createInspectionSchema, finishingActionSchema } from "@/lib/finishing/schemas";
import { checkAttachment, safeFilename, sniffAttachmentType } from "@/lib/finishing/attachments";

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
    // Ra (ISO 4287:1997 / ISO 21920-2:2021, ASME B46.1-2002: the mean absolute deviation of the
    // profile from its mean line) is a length: 125 µin is 3.175 µm exactly, not the 3.2 µm rung.
    expect(stored.ra_um).toBe(3.175);
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

describe("the size a unit was printed to", () => {
  const withGreen = { ...part, green_x_mm: 30.1, green_y_mm: 47.7, green_z_mm: 14.8 };
  it("comes from the build's own shrinkage snapshot, so a later recalibration does not change it", () => {
    // f = 1/(1 − s); green = (nominal + both stocks) × f
    const g = plannedGreen(withGreen, { shrink_xy: 0.16, shrink_z: 0.2 });
    expect(g.x).toBeCloseTo(25.5 / 0.84, 12);
    expect(g.y).toBeCloseTo(40.5 / 0.84, 12);
    expect(g.z).toBeCloseTo(12.25 / 0.8, 12);
    const byFactors = plannedGreen(withGreen, { factors: { xy: 1.25, z: 1.2 } });
    expect(byFactors.x).toBeCloseTo(25.5 * 1.25, 12);
  });
  it("falls back to the part's green size without a usable snapshot", () => {
    expect(plannedGreen(withGreen, null)).toEqual({ x: 30.1, y: 47.7, z: 14.8 });
    expect(plannedGreen(withGreen, { shrink_xy: 16, shrink_z: 20 })).toEqual({ x: 30.1, y: 47.7, z: 14.8 }); // percentages, not fractions
  });
});

describe("attachments are judged by their first bytes", () => {
  const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0]);
  const pdf = new TextEncoder().encode("%PDF-1.7\n");
  it("recognises photos and PDFs", () => {
    expect(sniffAttachmentType(png)).toBe("image/png");
    expect(sniffAttachmentType(pdf)).toBe("application/pdf");
    expect(sniffAttachmentType(new Uint8Array([0xff, 0xd8, 0xff, 0xe0]))).toBe("image/jpeg");
    expect(sniffAttachmentType(new TextEncoder().encode("RIFF\0\0\0\0WEBPVP8 "))).toBe("image/webp");
    expect(sniffAttachmentType(new TextEncoder().encode("solid cube"))).toBeUndefined();
  });
  it("gives 415 for another type, 422 when the contents do not match, 413 when too large", () => {
    expect(checkAttachment(png, "image/png", "a.png")).toBe("image/png");
    expect(() => checkAttachment(png, "text/plain", "a.txt")).toThrow(expect.objectContaining({ status: 415 }));
    expect(() => checkAttachment(pdf, "image/png", "a.png")).toThrow(expect.objectContaining({ status: 422 }));
    expect(() => checkAttachment(new Uint8Array(ATTACHMENT_MAX_BYTES + 1), "image/png", "big.png")).toThrow(expect.objectContaining({ status: 413 }));
    expect(safeFilename("../../etc/passwd")).toBe("etc_passwd");
    expect(safeFilename("bore photo (2).jpg")).toBe("bore_photo_2_.jpg");
  });
});
