import { describe, expect, it } from "vitest";
import { estimateDraw, estimateDrawOfTotal } from "@/lib/inventory/consumption";
import { receiveLotSchema } from "@/lib/inventory/schemas";
import { allocate, drawRefusal, fefo, type LotForDraw } from "@/lib/inventory/lots";
import { dayRange, noStockDecision, projectOnHand, reorderDecision } from "@/lib/inventory/projection";
import { bathState, gasShortfalls, runGasLitres } from "@/lib/inventory/consumables";
import { feedstockDensity } from "@/lib/process/scale-up";

describe("feedstock drawn by a build", () => {
  it("matches a worked example: green volume × feedstock density + allowances", () => {
    // 17-4 PH, wrought density 7.75 g/cm³ (AZoM, AISI 17-4 PH data sheet, article 6778), loaded at
    // φ = 0.60 by volume in a binder of 0.95 g/cm³ (the loading and binder of the shrinkage example
    // in German, Powder Injection Molding; the rule of mixtures for a two-phase mix):
    //   ρ_feedstock = 0.60·7.75 + 0.40·0.95 = 4.650 + 0.380 = 5.030 g/cm³
    const rho = feedstockDensity(0.6, 7.75, 0.95);
    expect(rho).toBeCloseTo(5.03, 10);
    // Three units of 12 000 mm³ green volume each = 36 cm³ → parts 36 × 5.03 = 181.08 g
    // supports and raft at 15 % of that = 27.162 g; purge before the build = 25 g
    // total 181.08 + 27.162 + 25 = 233.242 g → 233.2 g (kept to 0.1 g)
    const d = estimateDraw([{ green_volume_mm3: 12_000 }, { green_volume_mm3: 12_000 }, { green_volume_mm3: 12_000 }], {
      feedstock_density_g_cm3: rho,
      support_allowance: 0.15,
      purge_g: 25,
    });
    expect(d).toEqual({ parts_g: 181.1, supports_g: 27.2, purge_g: 25, total_g: 233.2 });
  });

  it("gives the same figures from the summed volume and the unit count (a schedule counted per part)", () => {
    const material = { feedstock_density_g_cm3: feedstockDensity(0.6, 7.75, 0.95), support_allowance: 0.15, purge_g: 25 };
    expect(estimateDrawOfTotal(36_000, 3, material)).toEqual({ parts_g: 181.1, supports_g: 27.2, purge_g: 25, total_g: 233.2 });
    expect(estimateDrawOfTotal(0, 0, material).total_g).toBe(0);
  });

  it("draws nothing for an empty build and refuses nonsense densities", () => {
    expect(estimateDraw([], { feedstock_density_g_cm3: 5, support_allowance: 0.1, purge_g: 20 }).total_g).toBe(0);
    expect(() => estimateDraw([{ green_volume_mm3: 1 }], { feedstock_density_g_cm3: 0, support_allowance: 0, purge_g: 0 })).toThrow(/density/);
  });
});

const lot = (over: Partial<LotForDraw>): LotForDraw => ({ id: over.code ?? "x", code: "L", state: "released", expires_on: null, remaining_g: 1000, received_on: "2026-11-01", ...over });

describe("which lots a build may draw from", () => {
  it("refuses quarantined, rejected, used-up and expired lots with the reason", () => {
    expect(drawRefusal(lot({ code: "Q", state: "quarantine" }), "2026-12-04")).toMatch(/quarantine/);
    expect(drawRefusal(lot({ code: "R", state: "rejected" }), "2026-12-04")).toMatch(/rejected/);
    expect(drawRefusal(lot({ code: "C", state: "consumed" }), "2026-12-04")).toMatch(/used up/);
    expect(drawRefusal(lot({ code: "E", expires_on: "2026-12-03" }), "2026-12-04")).toMatch(/expired on 2026-12-03/);
    // usable through its expiry day
    expect(drawRefusal(lot({ code: "D", expires_on: "2026-12-04" }), "2026-12-04")).toBeNull();
  });

  it("allocates first expiring first, across lots, or not at all", () => {
    const lots = [lot({ id: "late", code: "B", expires_on: "2027-06-01", remaining_g: 500 }), lot({ id: "soon", code: "A", expires_on: "2027-01-01", remaining_g: 300 }), lot({ id: "none", code: "C", remaining_g: 900 })];
    expect(fefo(lots).map((l) => l.id)).toEqual(["soon", "late", "none"]);
    expect(allocate(lots, 650, "2026-12-04")).toEqual([{ lot_id: "soon", grams: 300 }, { lot_id: "late", grams: 350 }]);
    expect(allocate(lots, 1701, "2026-12-04")).toBeNull();
    expect(allocate(lots, 1700, "2026-12-04")?.reduce((s, d) => s + d.grams, 0)).toBe(1700);
  });
});

describe("projected on hand", () => {
  it("matches a count by hand, day by day", () => {
    // Shelf: lot A 1000 g expiring 2026-12-06 (usable through the 6th), lot B 2000 g, no expiry; a
    // quarantined lot does not count. Builds: 300 g on the 4th, 900 g on the 5th, 1500 g on the 8th.
    const p = projectOnHand({
      today: "2026-12-04",
      horizon_days: 6,
      reorder_point_g: 1000,
      lots: [{ remaining_g: 1000, expires_on: "2026-12-06", usable: true }, { remaining_g: 2000, expires_on: null, usable: true }, { remaining_g: 5000, expires_on: null, usable: false }],
      builds: [
        { id: "b1", code: "B-1", day: "2026-12-04", grams: 300 },
        { id: "b2", code: "B-2", day: "2026-12-05", grams: 900 },
        { id: "b3", code: "B-3", day: "2026-12-08", grams: 1500 },
      ],
    });
    // 4th: 3000 − 300 (from A) = 2700 | 5th: A has 700 → takes 700, B gives 200 → 1800
    // 6th: nothing (A is empty, nothing to expire) = 1800 | 7th = 1800
    // 8th: B holds 1800 − 1500 = 300 | 9th = 300
    expect(p.days.map((d) => d.on_hand_g)).toEqual([2700, 1800, 1800, 1800, 300, 300]);
    expect(p.on_hand_g).toBe(3000);
    expect(p.committed_g).toBe(2700);
    expect(p.first_short_day).toBeNull();
    expect(p.first_below_reorder_day).toBe("2026-12-08");
  });

  it("drops what expires unused and finds the first short day and the builds it hits", () => {
    const p = projectOnHand({
      today: "2026-12-04",
      horizon_days: 5,
      reorder_point_g: 0,
      lots: [{ remaining_g: 1000, expires_on: "2026-12-05", usable: true }, { remaining_g: 400, expires_on: null, usable: true }],
      builds: [{ id: "b1", code: "B-1", day: "2026-12-07", grams: 500 }, { id: "b2", code: "B-2", day: "2026-12-08", grams: 100 }, { id: "late", code: "B-3", day: "2027-01-30", grams: 100 }],
    });
    // 4th, 5th: 1400 | 6th: lot A expires unused (1000) → 400 | 7th: 400 − 500 → −100 short
    expect(p.days.map((d) => [d.on_hand_g, d.expired_g])).toEqual([[1400, 0], [1400, 0], [400, 1000], [-100, 0], [-200, 0]]);
    expect(p.first_short_day).toBe("2026-12-07");
    expect(p.short_builds).toEqual(["b1", "b2"]);
    expect(p.committed_g).toBe(600); // the January build is beyond the horizon
  });

  it("counts a build whose start has passed but did not start as drawing today", () => {
    const p = projectOnHand({ today: "2026-12-04", horizon_days: 1, reorder_point_g: 0, lots: [{ remaining_g: 100, expires_on: null, usable: true }], builds: [{ id: "b", code: "B", day: "2026-12-01", grams: 40 }] });
    expect(p.days[0].on_hand_g).toBe(60);
  });

  it("mails once per crossing of the reorder point within the lead time", () => {
    expect(reorderDecision({ first_below_reorder_day: "2026-12-10", today: "2026-12-04", lead_time_days: 14, alerted: false })).toBe("alert");
    expect(reorderDecision({ first_below_reorder_day: "2026-12-10", today: "2026-12-04", lead_time_days: 14, alerted: true })).toBe("none");
    expect(reorderDecision({ first_below_reorder_day: "2026-12-30", today: "2026-12-04", lead_time_days: 14, alerted: false })).toBe("none");
    expect(reorderDecision({ first_below_reorder_day: null, today: "2026-12-04", lead_time_days: 14, alerted: true })).toBe("clear");
  });

  it("mails nothing for a material never received while no build needs it, and once when one does", () => {
    expect(noStockDecision({ first_need_day: null, alerted: false })).toBe("none");
    expect(noStockDecision({ first_need_day: "2027-02-20", alerted: false })).toBe("alert");
    expect(noStockDecision({ first_need_day: "2027-02-20", alerted: true })).toBe("none");
    expect(noStockDecision({ first_need_day: null, alerted: true })).toBe("clear");
  });

  it("lists calendar days across a month end", () => {
    expect(dayRange("2026-12-30", 4)).toEqual(["2026-12-30", "2026-12-31", "2027-01-01", "2027-01-02"]);
  });
});

describe("consumables", () => {
  it("sums binder dissolved from measured mass loss against the bath's limit", () => {
    // (100 − 92) + (50.5 − 46.5) = 8 + 4 = 12 g of 13 g → 92.3 %, change-out due (≥ 90 %)
    const s = bathState([{ green_mass_g: 100, brown_mass_g: 92 }, { green_mass_g: 50.5, brown_mass_g: 46.5 }, { green_mass_g: 10, brown_mass_g: null }], 13);
    expect(s).toEqual({ dissolved_g: 12, limit_g: 13, saturation: 0.923, due: true, measured_units: 2, unmeasured_units: 1 });
    expect(bathState([{ green_mass_g: 100, brown_mass_g: 95 }], 100).due).toBe(false);
  });

  it("estimates gas per run from flow × cycle and warns at the first run the supply cannot cover", () => {
    // 10 L/min × 1 200 min = 12 000 L
    expect(runGasLitres({ flow_l_per_min: 10, cycle_minutes: 1200 })).toBe(12_000);
    const w = gasShortfalls(
      [
        { id: "r2", code: "R-2", gas: "argon", flow_l_per_min: 10, cycle_minutes: 1200, starts_at: "2026-12-06T08:00:00Z" },
        { id: "r1", code: "R-1", gas: "argon", flow_l_per_min: 10, cycle_minutes: 1000, starts_at: "2026-12-05T08:00:00Z" },
        { id: "h", code: "R-3", gas: "hydrogen", flow_l_per_min: 5, cycle_minutes: 100, starts_at: "2026-12-05T09:00:00Z" },
      ],
      { argon: 20_000, hydrogen: 1_000 },
    );
    // R-1 takes 10 000 L of 20 000; R-2 needs 12 000 with 10 000 left → warned. R-3 needs 500 of 1 000.
    expect(w).toEqual([{ run_id: "r2", code: "R-2", gas: "argon", needed_l: 12_000, left_before_l: 10_000 }]);
  });
});

describe("receiving a lot: the shared field rules", () => {
  const base = { material_id: "7f1d2c9e-8a4b-4c3d-9e2f-1a2b3c4d5e6f", supplier: "Test Powders", supplier_lot: "B-17", received_on: "2026-11-01", quantity_kg: 5 };
  it("refuses control characters in a name, keeps line breaks in the storage notes", () => {
    expect(receiveLotSchema.safeParse({ ...base, supplier: "Test\u0007Powders" }).success).toBe(false);
    expect(receiveLotSchema.parse({ ...base, storage_notes: "dry cabinet\nshelf 2" }).storage_notes).toBe("dry cabinet\nshelf 2");
    expect(receiveLotSchema.safeParse({ ...base, storage_notes: "a\u0000b" }).success).toBe(false);
  });
  it("takes real calendar days only, within the planning years", () => {
    expect(receiveLotSchema.safeParse({ ...base, received_on: "2026-02-30" }).success).toBe(false);
    expect(receiveLotSchema.safeParse({ ...base, received_on: "3026-01-01" }).success).toBe(false);
    expect(receiveLotSchema.safeParse({ ...base, expires_on: "2026-10-01" }).success).toBe(false);
    expect(receiveLotSchema.parse({ ...base, expires_on: "2027-05-01" }).expires_on).toBe("2027-05-01");
  });
});
