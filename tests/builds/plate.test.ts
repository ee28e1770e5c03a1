import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { layoutPlate } from "@/lib/builds/plate";
import { FIT_TOLERANCE_MM } from "@/lib/packing/trays";
import { judgePrinter, type BuildUnitSpec, type PrinterSpec } from "@/lib/builds/estimate";
import { buildPrintMinutes } from "@/lib/process/print-time";

// Plate layout (lib/packing/plate behind the build's own shape) and printer verdicts: footprints
// never overlap, keep the clearance to each other and to the edge, and a printer is refused for
// the reason that applies.

// The packer in lib/packing allows itself a fit tolerance of FIT_TOLERANCE_MM (0.01 mm).
const TOL = FIT_TOLERANCE_MM + 1e-6;
const overlaps = (a: { x_mm: number; y_mm: number; w_mm: number; h_mm: number }, b: typeof a, gap: number) =>
  a.x_mm < b.x_mm + b.w_mm + gap - TOL && b.x_mm < a.x_mm + a.w_mm + gap - TOL && a.y_mm < b.y_mm + b.h_mm + gap - TOL && b.y_mm < a.y_mm + a.h_mm + gap - TOL;

describe("layoutPlate", () => {
  it("places four 100 × 100 mm footprints on a 215 × 215 mm plate with 5 mm clearance, and not on a 214 mm one", () => {
    const items = [1, 2, 3, 4].map((i) => ({ id: `u${i}`, x_mm: 100, y_mm: 100, z_mm: 10 }));
    // 5 + 100 + 5 + 100 + 5 = 215
    expect(layoutPlate(items, { x_mm: 215, y_mm: 215 }, 5).unplaced).toEqual([]);
    expect(layoutPlate(items, { x_mm: 214, y_mm: 215 }, 5).unplaced.length).toBeGreaterThan(0);
  });

  it("turns a long part a quarter turn when only that fits", () => {
    const r = layoutPlate([{ id: "long", x_mm: 40, y_mm: 180, z_mm: 5 }], { x_mm: 200, y_mm: 60 }, 5);
    expect(r.unplaced).toEqual([]);
    expect(r.placements[0]).toMatchObject({ rotated: true, w_mm: 180, h_mm: 40 });
  });

  it("says why a piece is left off: too big for the plate, or no room left", () => {
    const r = layoutPlate(
      [{ id: "huge", x_mm: 500, y_mm: 10, z_mm: 5 }, { id: "a", x_mm: 90, y_mm: 90, z_mm: 5 }, { id: "b", x_mm: 90, y_mm: 90, z_mm: 5 }],
      { x_mm: 100, y_mm: 100 },
      5,
    );
    expect(r.unplaced.find((u) => u.id === "huge")!.reason).toMatch(/does not fit/);
    expect(r.unplaced.find((u) => u.id === "b" || u.id === "a")!.reason).toMatch(/no room/);
  });

  it("never overlaps, keeps the clearance and stays on the plate (property)", () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ x: fc.double({ min: 5, max: 120, noNaN: true }), y: fc.double({ min: 5, max: 120, noNaN: true }) }), { minLength: 1, maxLength: 25 }),
        fc.double({ min: 0, max: 10, noNaN: true }),
        (sizes, clearance) => {
          const items = sizes.map((s, i) => ({ id: `u${i}`, x_mm: s.x, y_mm: s.y, z_mm: 10 }));
          const r = layoutPlate(items, { x_mm: 300, y_mm: 250 }, clearance);
          expect(r.placements.length + r.unplaced.length).toBe(items.length);
          for (const p of r.placements) {
            expect(p.x_mm).toBeGreaterThanOrEqual(clearance - TOL);
            expect(p.y_mm).toBeGreaterThanOrEqual(clearance - TOL);
            expect(p.x_mm + p.w_mm).toBeLessThanOrEqual(300 - clearance + TOL);
            expect(p.y_mm + p.h_mm).toBeLessThanOrEqual(250 - clearance + TOL);
          }
          for (let i = 0; i < r.placements.length; i++) {
            for (let j = i + 1; j < r.placements.length; j++) expect(overlaps(r.placements[i], r.placements[j], clearance)).toBe(false);
          }
          expect(r.fill).toBeLessThanOrEqual(1 + 1e-9);
        },
      ),
      { numRuns: 150 },
    );
  });

  it("refuses nonsense inputs with an error instead of NaN", () => {
    expect(() => layoutPlate([{ id: "a", x_mm: -1, y_mm: 5, z_mm: 5 }], { x_mm: 100, y_mm: 100 }, 5)).toThrow(/positive green size/);
    expect(() => layoutPlate([], { x_mm: 0, y_mm: 100 }, 5)).toThrow(/plate/);
    expect(() => layoutPlate([], { x_mm: 100, y_mm: 100 }, Number.NaN)).toThrow(/clearance/);
  });
});

describe("judgePrinter", () => {
  const printer: PrinterSpec = {
    id: "p1", name: "Wren", build_x_mm: 300, build_y_mm: 220, build_z_mm: 180, deposition_cm3_per_h: 22, layer_height_mm: 0.15, layer_overhead_s: 8, material_ids: ["m1"], active: true,
  };
  const unit = (i: number, z = 40): BuildUnitSpec => ({ unit_id: `u${i}`, serial: `S-${i}`, material_id: "m1", green_x_mm: 50, green_y_mm: 40, green_z_mm: z, green_volume_mm3: 30_000 });

  it("estimates with lib/process/print-time: volume over rate plus layers of the tallest part", () => {
    const v = judgePrinter([unit(1), unit(2, 60)], "m1", printer, 5);
    const t = buildPrintMinutes({ printer: { depositionCm3PerH: 22, layerHeightMm: 0.15, layerOverheadS: 8 }, parts: [{ greenVolumeMm3: 30_000, heightMm: 40 }, { greenVolumeMm3: 30_000, heightMm: 60 }] });
    expect(v.ok).toBe(true);
    expect(v.est_minutes).toBe(Math.ceil(t.totalMinutes));
    // 60 cm³ at 22 cm³/h = 163.6 min, plus 400 layers × 8 s = 53.3 min
    expect(v.est_minutes).toBe(217);
  });

  it("refuses another material, a part over the gantry, a plate that cannot take them all, and a printer out of service", () => {
    expect(judgePrinter([unit(1)], "m2", printer, 5).reason).toMatch(/material/);
    expect(judgePrinter([unit(1, 176)], "m1", printer, 5).reason).toMatch(/build height/);
    expect(judgePrinter(Array.from({ length: 40 }, (_, i) => unit(i)), "m1", printer, 5).reason).toMatch(/plate/);
    expect(judgePrinter([unit(1)], "m1", { ...printer, active: false }, 5).reason).toMatch(/out of service/);
  });
});
