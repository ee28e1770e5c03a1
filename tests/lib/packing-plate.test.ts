import { describe, expect, it } from "vitest";
import { packPlate, type PlateUnit } from "@/lib/packing/plate";

const printer = { id: "P1", build_volume_mm: [300, 220, 180] as const };
const u = (id: string, w: number, d: number, h = 40, due?: string): PlateUnit => ({ id, footprint_mm: [w, d], height_mm: h, due });

describe("packPlate", () => {
  it("places footprints inside the plate with clearance between them and to the edge", () => {
    const units = Array.from({ length: 6 }, (_, i) => u(`g${i}`, 80, 60));
    const res = packPlate(units, printer, 8);
    expect(res.unplaced).toEqual([]);
    expect(res.placements).toHaveLength(6);
    for (const p of res.placements) {
      expect(p.x).toBeGreaterThanOrEqual(8 - 0.011);
      expect(p.y).toBeGreaterThanOrEqual(8 - 0.011);
      expect(p.x + p.w).toBeLessThanOrEqual(300 - 8 + 0.011);
      expect(p.y + p.d).toBeLessThanOrEqual(220 - 8 + 0.011);
    }
    for (const a of res.placements) {
      for (const b of res.placements) {
        if (a === b) continue;
        const gx = Math.max(b.x - (a.x + a.w), a.x - (b.x + b.w));
        const gy = Math.max(b.y - (a.y + a.d), a.y - (b.y + b.d));
        expect(Math.max(gx, gy)).toBeGreaterThanOrEqual(8 - 0.011);
      }
    }
    expect(res.area_used_fraction).toBeCloseTo((6 * 80 * 60) / (300 * 220), 9);
    expect(res.plates_needed).toBe(1);
  });

  it("reports units taller than Z or wider than the plate, and what does not fit, most urgent kept", () => {
    const units = [
      u("tall", 50, 50, 200),
      u("wide", 310, 20),
      // Three 140×100 with 10 mm clearance: only two fit on 300×220 ((140+10)·2+10 = 310 > 300 → stacked).
      u("late", 140, 100, 40, "2027-02-01T00:00:00Z"),
      u("soon", 140, 100, 40, "2027-01-05T00:00:00Z"),
      u("sooner", 140, 100, 40, "2027-01-04T12:00:00Z"),
    ];
    const res = packPlate(units, printer, 10);
    const codes = Object.fromEntries(res.unplaced.map((x) => [x.unit, x.code]));
    expect(codes).toEqual({ tall: "too_tall", wide: "too_large", late: "no_room" });
    expect(res.placements.map((p) => p.unit).sort()).toEqual(["soon", "sooner"]);
    expect(res.plates_needed).toBe(2);
    expect(res.lower_bound_plates).toBeLessThanOrEqual(res.plates_needed);
  });

  it("an empty build gives an empty plate", () => {
    expect(packPlate([], printer, 5)).toMatchObject({ placements: [], unplaced: [], plates_needed: 0 });
  });
});
