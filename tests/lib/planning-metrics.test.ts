import { describe, expect, it } from "vitest";
import {
  furnaceRunsInstanceSchema,
  planningInstanceSchema,
  printerPlanInstanceSchema,
  type FurnaceRunsInstance,
  type PrinterPlanInstance,
} from "@/lib/planning/instances";
import { latenessMinutes, makespanMinutes, maxLatenessMinutes, verifyPlan, verifyRuns } from "@/lib/planning/metrics";
import { StaffedCalendar } from "@/lib/planning/staffed-hours";

const furnaceInst: FurnaceRunsInstance = {
  kind: "furnace-runs",
  name: "v",
  clearance_mm: 5,
  furnaces: [{ id: "F1", tray_mm: [300, 250], tray_count: 2, usable_height_mm: 100, max_load_g: 1000, profiles: ["H13-std"] }],
  units: [
    { id: "a", profile: "H13-std", footprint_mm: [100, 50], height_mm: 40, mass_g: 400, due: "2027-01-10T00:00:00Z" },
    { id: "b", profile: "H13-std", footprint_mm: [100, 50], height_mm: 40, mass_g: 400, due: "2027-01-10T00:00:00Z" },
    { id: "c", profile: "174PH-std", footprint_mm: [50, 50], height_mm: 140, mass_g: 300, due: "2027-01-10T00:00:00Z" },
  ],
};

const good = [
  {
    furnace: "F1",
    profile: "H13-std",
    placements: [
      { unit: "a", tray: 0, x: 5, y: 5, rotated: false },
      { unit: "b", tray: 0, x: 110, y: 5, rotated: false },
    ],
  },
];

describe("verifyRuns", () => {
  it("accepts a correct plan", () => {
    expect(verifyRuns(furnaceInst, good, [{ unit: "c" }])).toEqual({ ok: true, violations: [] });
  });

  it("catches each broken rule", () => {
    const v = (runs: typeof good, unplaced?: { unit: string }[]) => verifyRuns(furnaceInst, runs, unplaced).violations.join("\n");
    const with_ = (p: Partial<(typeof good)[0]["placements"][0]>, i = 1) => [{ ...good[0], placements: good[0].placements.map((q, k) => (k === i ? { ...q, ...p } : q)) }];
    expect(v(with_({ x: 108 }))).toMatch(/closer than the clearance/);
    expect(v(with_({ x: 200 }))).toMatch(/leaves the tray/);
    expect(v(with_({ x: 0 }, 0))).toMatch(/leaves the tray/);
    expect(v(with_({ tray: 2 }))).toMatch(/does not exist/);
    expect(v(with_({ x: 5, y: 58, rotated: true }))).toMatch(/closer than the clearance/);
    expect(v(with_({ x: 5, y: 60, rotated: true }))).not.toMatch(/clearance/);
    expect(v([{ ...good[0], placements: [...good[0].placements, { unit: "c", tray: 1, x: 5, y: 5, rotated: false }] }])).toMatch(/174PH-std\) is in a H13-std run[\s\S]*taller/);
    expect(v([...good, { furnace: "F1", profile: "H13-std", placements: [{ unit: "a", tray: 1, x: 5, y: 5, rotated: false }] }])).toMatch(/more than once/);
    expect(v(good, [])).toMatch(/c is neither placed nor reported/);
    expect(v([{ ...good[0], furnace: "F9" }])).toMatch(/unknown furnace/);
    const heavy: FurnaceRunsInstance = { ...furnaceInst, units: furnaceInst.units.map((u) => ({ ...u, mass_g: 600 })) };
    expect(verifyRuns(heavy, good).violations.join()).toMatch(/exceeds the load limit/);
  });
});

const planInst: PrinterPlanInstance = {
  kind: "printer-plan",
  name: "p",
  now: "2027-01-04T06:00:00Z",
  printers: [
    { id: "P1", materials: ["H13"], build_volume_mm: [300, 220, 180], available_from: "2027-01-04T08:00:00Z", blocked: [{ start: "2027-01-05T00:00:00Z", end: "2027-01-05T04:00:00Z" }] },
  ],
  builds: [
    { id: "b1", material: "H13", size_mm: [200, 280, 100], duration_min: 120, due: "2027-01-04T12:00:00Z" },
    { id: "b2", material: "H13", size_mm: [100, 100, 100], duration_min: 60, due: "2027-01-04T10:00:00Z" },
  ],
};

describe("verifyPlan", () => {
  const ok = [
    { build: "b1", printer: "P1", start: "2027-01-04T08:00:00Z", end: "2027-01-04T10:00:00Z" },
    { build: "b2", printer: "P1", start: "2027-01-04T10:00:00Z", end: "2027-01-04T11:00:00Z" },
  ];
  it("accepts a correct plan (touching bookings are fine) and computes its metrics", () => {
    expect(verifyPlan(planInst, ok, [])).toEqual({ ok: true, violations: [] });
    expect(makespanMinutes(planInst.now, ok.map((a) => a.end))).toBe(300);
    expect(latenessMinutes(ok[1].end, planInst.builds[1].due)).toBe(60);
    expect(maxLatenessMinutes(ok.map((a, i) => ({ end: a.end, due: planInst.builds[i].due })))).toBe(60);
    expect(maxLatenessMinutes([])).toBeNull();
  });

  it("catches double booking, blocked windows, early starts, wrong durations, incompatibility and gaps in coverage", () => {
    const v = (a: typeof ok, inst = planInst, unplaced?: { build: string }[]) => verifyPlan(inst, a, unplaced).violations.join("\n");
    expect(v([ok[0], { ...ok[1], start: "2027-01-04T09:30:00Z", end: "2027-01-04T10:30:00Z" }])).toMatch(/overlap/);
    expect(v([ok[0], { ...ok[1], start: "2027-01-05T03:30:00Z", end: "2027-01-05T04:30:00Z" }])).toMatch(/blocked window/);
    expect(v([{ ...ok[0], start: "2027-01-04T07:00:00Z", end: "2027-01-04T09:00:00Z" }, ok[1]])).toMatch(/before printer P1 is available/);
    expect(v([{ ...ok[0], end: "2027-01-04T09:00:00Z" }, ok[1]])).toMatch(/runs 60 min, needs 120/);
    const small: PrinterPlanInstance = { ...planInst, printers: [{ ...planInst.printers[0], build_volume_mm: [250, 250, 180], materials: ["A2"] }] };
    expect(v(ok, small)).toMatch(/does not take H13[\s\S]*does not fit/);
    expect(v([ok[0]], planInst, [])).toMatch(/b2 is neither assigned nor reported/);
    const staffed = { ...planInst, staffed_hours: { timeZone: "UTC", pattern: [{ day: 1, start: "09:00", end: "17:00" }] } };
    expect(v(ok, staffed)).toMatch(/b1: starts outside staffed hours/);
  });
});

describe("instance schemas", () => {
  it("ignore unknown fields and reject malformed ones", () => {
    const parsed = furnaceRunsInstanceSchema.parse({ ...furnaceInst, known_optimum_runs: 2, note: "x" });
    expect(parsed).not.toHaveProperty("known_optimum_runs");
    expect(() => furnaceRunsInstanceSchema.parse({ ...furnaceInst, clearance_mm: -1 })).toThrow();
    expect(() => furnaceRunsInstanceSchema.parse({ ...furnaceInst, units: [{ ...furnaceInst.units[0], footprint_mm: [10] }] })).toThrow();
    expect(() => printerPlanInstanceSchema.parse({ ...planInst, now: "tomorrow" })).toThrow();
    expect(() => printerPlanInstanceSchema.parse({ ...planInst, printers: [{ ...planInst.printers[0], blocked: [{ start: "2027-01-05T04:00:00Z", end: "2027-01-05T00:00:00Z" }] }] })).toThrow();
    expect(planningInstanceSchema.parse(planInst).kind).toBe("printer-plan");
    expect(() => planningInstanceSchema.parse({ ...planInst, kind: "wash-batches" })).toThrow();
  });

  it("printer blocked windows and availability are optional", () => {
    const p = printerPlanInstanceSchema.parse({ ...planInst, printers: [{ id: "P", materials: ["H13"], build_volume_mm: [1, 1, 1] }] });
    expect(p.printers[0].blocked).toEqual([]);
    expect(p.printers[0].available_from).toBeUndefined();
  });
});

describe("StaffedCalendar", () => {
  it("handles overnight shifts and far-off times", () => {
    // Every night 22:00–06:00 in Chicago (UTC−6 in January).
    const cal = new StaffedCalendar({ timeZone: "America/Chicago", pattern: [0, 1, 2, 3, 4, 5, 6].map((day) => ({ day, start: "22:00", end: "06:00" })) }, Date.parse("2027-01-04T12:00:00Z"));
    expect(new Date(cal.nextStart(Date.parse("2027-01-04T12:00:00Z"))).toISOString()).toBe("2027-01-05T04:00:00.000Z");
    expect(cal.isStaffed(Date.parse("2027-01-05T11:59:00Z"))).toBe(true);
    expect(cal.isStaffed(Date.parse("2027-01-05T12:00:00Z"))).toBe(false);
    // A year on, past several lazy expansions and two daylight-saving changes (UTC−6 again).
    expect(new Date(cal.nextStart(Date.parse("2028-01-04T12:00:00Z"))).toISOString()).toBe("2028-01-05T04:00:00.000Z");
  });
});
