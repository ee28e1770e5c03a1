import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { checkFurnaceAdd, checkWashAdd, currentLayout, furnaceGauges, layoutWithout, washMinutesOf } from "@/lib/batches/rules";
import { isStaffedAt, nextStaffed, staffingOf } from "@/lib/batches/staffed";
import { earliestSlot, suggestBatches, type Busy } from "@/lib/batches/suggest";
import type { BoardFurnace, BoardProfile, BoardStation, BoardUnit } from "@/lib/batches/types";
import { FIT_TOLERANCE_MM } from "@/lib/packing/trays";
import { washMinutes } from "@/lib/process/wash";

// The batching rules as the board (in the browser) and the API both run them.

const P1: BoardProfile = {
  id: "p1", code: "A", revision: 1, label: "A r1", name: "A", atmosphere: "H2", start_temp_c: 20, cool_rate_c_per_min: 10, cool_to_c: 100,
  material_ids: ["m1"], segments: [{ position: 0, rate_c_per_min: 5, setpoint_c: 600, hold_min: 60 }, { position: 1, rate_c_per_min: 5, setpoint_c: 1350, hold_min: 120 }],
};
const P2: BoardProfile = { ...P1, id: "p2", code: "B", label: "B r1", material_ids: ["m2"] };
const FURNACE: BoardFurnace = { id: "f1", name: "Kiln", tray_x_mm: 300, tray_y_mm: 250, tray_count: 2, usable_height_mm: 100, max_load_g: 5000, max_cool_rate_c_per_min: 10, profile_ids: ["p1", "p2"] };
const STATION: BoardStation = { id: "s1", name: "Bay", solvent: "x", basket_x_mm: 300, basket_y_mm: 200, basket_z_mm: 120, capacity_units: 3, max_load_g: 1000 };

let n = 0;
function unit(over: Partial<BoardUnit> = {}): BoardUnit {
  n++;
  return {
    id: `u${n}`, serial: `U-${n}`, version: 1, state: "brown", part_id: "pt", part_number: "P", part_name: "part", order_code: "WO", due_at: new Date(Date.UTC(2027, 0, 10 + (n % 5))).toISOString(),
    priority: 3, material_id: "m1", material_code: "M1", profile_id: "p1", compatible_profile_ids: ["p1"], green_x_mm: 50, green_y_mm: 40, green_z_mm: 30, mass_g: 200, mass_source: "brown",
    green_mass_g: 210, brown_mass_g: 200, wash_passed: true, min_mass_loss: 0.035, thickest_wall_mm: 4, wash_minutes: 540, wash_k_min_per_mm2: 30, wash_min_minutes: 60,
    wash_batch_id: null, furnace_run_id: null, ready_at: null, slack_minutes: 100, projection_status: "on_time", hold_reason: null, ...over,
  };
}

const openRun = { state: "draft" as const, tray_layout: null, profile_id: "p1", code: "R-1", starts_at: null };

describe("furnace run rules", () => {
  it("accepts a fitting brown unit and places it inside the tray with clearance", () => {
    const r = checkFurnaceAdd(openRun, [], unit(), FURNACE, [P1, P2], 5);
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    const p = r.layout.trays[0].placements[0];
    expect(p.x).toBeGreaterThanOrEqual(5);
    expect(p.y).toBeGreaterThanOrEqual(5);
    expect(p.x + p.w).toBeLessThanOrEqual(300 - 5 + 1e-9);
    expect(p.y + p.d).toBeLessThanOrEqual(250 - 5 + 1e-9);
  });

  it("refuses another profile, too tall, too heavy, no room and green units, each with its own code", () => {
    const other = unit({ material_id: "m2", material_code: "M2", profile_id: "p2", compatible_profile_ids: ["p2"] });
    expect(checkFurnaceAdd(openRun, [], other, FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "profile" });
    expect(checkFurnaceAdd(openRun, [], unit({ green_z_mm: 101 }), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "height" });
    expect(checkFurnaceAdd(openRun, [], unit({ mass_g: 5001 }), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "load" });
    expect(checkFurnaceAdd(openRun, [], unit({ green_x_mm: 296, green_y_mm: 100 }), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "room" });
    expect(checkFurnaceAdd(openRun, [], unit({ state: "green" }), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "unit_state" });
    expect(checkFurnaceAdd({ ...openRun, state: "running" }, [], unit(), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "state" });
    expect(checkFurnaceAdd(openRun, [], unit({ state: "washing", wash_passed: false }), FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "unit_state" });
  });

  it("lets a material listed as compatible join a run of another profile", () => {
    const listed = unit({ material_id: "m2", profile_id: "p2", compatible_profile_ids: ["p1", "p2"] });
    expect(checkFurnaceAdd(openRun, [], listed, FURNACE, [P1, P2], 5).ok).toBe(true);
  });

  it("refuses a washing unit that dries only after a booked run loads", () => {
    const run = { ...openRun, state: "scheduled" as const, starts_at: "2027-01-05T06:00:00.000Z" };
    const late = unit({ state: "washing", wash_passed: null, ready_at: "2027-01-05T09:00:00.000Z" });
    expect(checkFurnaceAdd(run, [], late, FURNACE, [P1, P2], 5)).toMatchObject({ ok: false, code: "timing" });
    expect(checkFurnaceAdd(run, [], { ...late, ready_at: "2027-01-05T05:00:00.000Z" }, FURNACE, [P1, P2], 5).ok).toBe(true);
  });

  it("fills the trays one unit at a time until there is no room, never overlapping", () => {
    const units: BoardUnit[] = [];
    let layout = null;
    for (let i = 0; i < 20; i++) {
      const u = unit({ green_x_mm: 90, green_y_mm: 70, mass_g: 100 });
      const r = checkFurnaceAdd({ ...openRun, tray_layout: layout }, units, u, FURNACE, [P1, P2], 5);
      if (!r.ok) {
        expect(r.code).toBe("room");
        break;
      }
      units.push(u);
      layout = r.layout;
    }
    // 95 × 75 (with clearance) into 295 × 245: 3 × 3 = 9 per tray
    expect(units.length).toBe(18);
    const gauges = furnaceGauges(layout, units, FURNACE);
    expect(gauges.find((g) => g.key === "trays")!.used).toBe(2);
    expect(gauges.find((g) => g.key === "load")!.used).toBe(1800);
    for (const t of layout!.trays) {
      for (const a of t.placements) for (const b of t.placements) {
        if (a === b) continue;
        // the packer allows FIT_TOLERANCE_MM of rounding in the clearance (lib/packing/tray-model.ts)
        const e = FIT_TOLERANCE_MM + 1e-6;
        const apart = a.x + a.w + 5 <= b.x + e || b.x + b.w + 5 <= a.x + e || a.y + a.d + 5 <= b.y + e || b.y + b.d + 5 <= a.y + e;
        expect(apart).toBe(true);
      }
    }
    const fewer = layoutWithout(layout!, units[0].id, units.slice(1), FURNACE, P1, [P1, P2]);
    expect(fewer.trays.flatMap((t) => t.placements)).toHaveLength(17);
    expect(fewer.mass_g).toBe(1700);
  });

  it("re-packs a run whose stored layout no longer names its units, and refuses one that no longer fits", () => {
    const units = [unit(), unit()];
    const r = currentLayout(null, units, FURNACE, P1, [P1, P2], 5);
    expect(r.ok && r.repacked).toBe(true);
    const tooMany = Array.from({ length: 3 }, () => unit({ green_x_mm: 200, green_y_mm: 150 }));
    expect(currentLayout(null, tooMany, FURNACE, P1, [P1, P2], 5)).toMatchObject({ ok: false });
  });
});

describe("wash batch rules", () => {
  it("takes green units up to the basket's count and load, standing as printed", () => {
    const green = (o: Partial<BoardUnit> = {}) => unit({ state: "green", mass_g: 300, ...o });
    const a = green();
    const b = green();
    expect(checkWashAdd({ state: "draft", code: "W" }, [], a, STATION).ok).toBe(true);
    expect(checkWashAdd({ state: "draft", code: "W" }, [a, b, green()], green(), STATION)).toMatchObject({ ok: false, code: "capacity" });
    expect(checkWashAdd({ state: "draft", code: "W" }, [a, b, green()].slice(0, 2), green({ mass_g: 401 }), STATION)).toMatchObject({ ok: false, code: "load" });
    expect(checkWashAdd({ state: "draft", code: "W" }, [], green({ green_z_mm: 121 }), STATION)).toMatchObject({ ok: false, code: "size" });
    expect(checkWashAdd({ state: "draft", code: "W" }, [], green({ green_x_mm: 190, green_y_mm: 290 }), STATION).ok).toBe(true);
    expect(checkWashAdd({ state: "draft", code: "W" }, [], unit({ state: "brown" }), STATION)).toMatchObject({ ok: false, code: "unit_state" });
  });

  it("lasts as long as its slowest unit (t = k·h² + t_min)", () => {
    const thin = unit({ thickest_wall_mm: 2 });
    const thick = unit({ thickest_wall_mm: 6 });
    expect(washMinutesOf([thin, thick])).toBe(washMinutes({ thickestWallMm: 6, kMinPerMm2: 30, minMinutes: 60 }));
    expect(washMinutesOf([thin, thick])).toBe(30 * 36 + 60);
    expect(washMinutesOf([])).toBeNull();
  });
});

describe("staffed hours", () => {
  const staffing = staffingOf([{ day: 1, start: "06:00", end: "22:00" }, { day: 7, start: "08:00", end: "12:00" }], "UTC");

  it("reads the shop's pattern, a 7 as Sunday, and an empty pattern as always staffed", () => {
    expect(staffingOf([], "UTC")).toBeNull();
    expect(isStaffedAt(new Date("2027-01-04T05:59:00Z"), staffing)).toBe(false); // a Monday
    expect(isStaffedAt(new Date("2027-01-04T06:00:00Z"), staffing)).toBe(true);
    expect(isStaffedAt(new Date("2027-01-10T09:00:00Z"), staffing)).toBe(true); // a Sunday
    expect(nextStaffed(new Date("2027-01-04T23:00:00Z"), staffing).toISOString()).toBe("2027-01-10T08:00:00.000Z");
    expect(isStaffedAt(new Date("2027-01-05T03:00:00Z"), null)).toBe(true);
  });

  it("finds the earliest staffed slot clear of every booking", () => {
    const busy: Busy[] = [{ resource_id: "f", start: Date.parse("2027-01-04T06:00:00Z"), end: Date.parse("2027-01-04T12:00:00Z") }];
    const t = earliestSlot("f", Date.parse("2027-01-04T05:00:00Z"), 120, busy, staffing);
    expect(new Date(t).toISOString()).toBe("2027-01-04T12:00:00.000Z");
    const other = earliestSlot("g", Date.parse("2027-01-04T05:00:00Z"), 120, busy, staffing);
    expect(new Date(other).toISOString()).toBe("2027-01-04T06:00:00.000Z");
  });
});

describe("suggest batches", () => {
  const base = { now: new Date("2027-01-04T06:00:00Z"), staffing: null, clearance_mm: 5, drying_minutes: 120, finishing_lead_minutes: 1440, wash: true, furnace: true, busy: [] as Busy[] };

  it("proposes every unit exactly once, never fewer runs than the lower bound, never overlapping bookings", () => {
    fc.assert(
      fc.property(
        fc.array(fc.record({ w: fc.integer({ min: 15, max: 140 }), d: fc.integer({ min: 15, max: 110 }), h: fc.integer({ min: 5, max: 95 }), m: fc.integer({ min: 20, max: 900 }), two: fc.boolean() }), { minLength: 1, maxLength: 40 }),
        (specs) => {
          const units = specs.map((s) =>
            s.two
              ? unit({ green_x_mm: s.w, green_y_mm: s.d, green_z_mm: s.h, mass_g: s.m, material_id: "m2", profile_id: "p2", compatible_profile_ids: ["p2"] })
              : unit({ green_x_mm: s.w, green_y_mm: s.d, green_z_mm: s.h, mass_g: s.m }),
          );
          const busy: Busy[] = [{ resource_id: "f1", start: base.now.getTime(), end: base.now.getTime() + 5 * 3_600_000 }];
          const r = suggestBatches({ ...base, busy, furnaces: [FURNACE], stations: [STATION], profiles: [P1, P2], wash_units: [], furnace_units: units, restarts: 1 });
          const ids = r.furnace.flatMap((run) => run.units.map((u) => u.id));
          expect(new Set(ids).size).toBe(ids.length);
          expect(ids.length + r.unplaced.length).toBe(units.length);
          expect(r.metrics.furnace_runs).toBeGreaterThanOrEqual(r.metrics.lower_bound);
          const spans = [...busy.map((b) => [b.start, b.end]), ...r.furnace.map((run) => [Date.parse(run.starts_at), Date.parse(run.ends_at)])];
          for (let i = 0; i < spans.length; i++) for (let j = i + 1; j < spans.length; j++) expect(spans[i][1] <= spans[j][0] || spans[j][1] <= spans[i][0]).toBe(true);
          for (const run of r.furnace) expect(run.tray_layout.mass_g).toBeLessThanOrEqual(FURNACE.max_load_g);
        },
      ),
      { numRuns: 25 },
    );
  });

  it("groups green units into wash batches within the basket's limits, longest washes together", () => {
    const walls = [2, 6, 2, 6, 2, 6, 3];
    const units = walls.map((w) => unit({ state: "green", thickest_wall_mm: w, wash_minutes: 30 * w * w + 60, mass_g: 100 }));
    const r = suggestBatches({ ...base, furnaces: [FURNACE], stations: [STATION], profiles: [P1], wash_units: units, furnace_units: [], furnace: false });
    expect(r.wash.reduce((s, b) => s + b.units.length, 0)).toBe(units.length);
    for (const b of r.wash) expect(b.units.length).toBeLessThanOrEqual(STATION.capacity_units);
    // first-fit decreasing by wash time puts the three 6 mm walls in one basket
    const first = r.wash.find((b) => b.est_minutes === 30 * 36 + 60)!;
    expect(first.units.map((u) => walls[units.findIndex((x) => x.id === u.id)])).toEqual([6, 6, 6]);
    const spans = r.wash.map((b) => [Date.parse(b.starts_at), Date.parse(b.ends_at)]).sort((a, b) => a[0] - b[0]);
    for (let i = 1; i < spans.length; i++) expect(spans[i][0]).toBeGreaterThanOrEqual(spans[i - 1][1]);
  });
});
