import { describe, expect, it } from "vitest";
import { byRisk, mostAtRisk, prepareBoardUnit, projectBoardUnit, toBoardUnit, type BoardUnitContext, type BoardUnitRow } from "@/lib/batches/board-unit";
import { staffingOf } from "@/lib/batches/staffed";
import type { BoardProfile } from "@/lib/batches/types";
import { furnaceCycle } from "@/lib/process/furnace-profile";
import { projectUnit } from "@/lib/process/projection";
import { washMinutes } from "@/lib/process/wash";

// The board's units waiting for a wash are worked from their rows once and projected again as
// the clock moves (lib/batches/board-unit.ts). Checked here against the projection worked from
// scratch with lib/process/projection.ts at each moment, and against ranking every unit.

const H = 3_600_000;
const profile: BoardProfile = {
  id: "p1", code: "S17", revision: 1, label: "S17 r1", name: "17-4PH sinter", atmosphere: "hydrogen",
  start_temp_c: 20, cool_rate_c_per_min: 5, cool_to_c: 100, material_ids: ["m1"],
  segments: [{ position: 1, rate_c_per_min: 5, setpoint_c: 600, hold_min: 60 }, { position: 2, rate_c_per_min: 3, setpoint_c: 1300, hold_min: 120 }],
};
// Weekdays 06:00–22:00 in Chicago: the projection waits for a shift to load a wash or a furnace.
const staffing = staffingOf([1, 2, 3, 4, 5].map((day) => ({ day, start: "06:00", end: "22:00" })), "America/Chicago");
const ctxAt = (now: number): BoardUnitContext => ({ now: new Date(now), staffing, drying_minutes: 120, finishing_lead_minutes: 480, at_risk_margin_minutes: 600, profiles: [profile] });

const base = Date.UTC(2026, 2, 6, 15, 0); // a Friday afternoon in Chicago
function row(i: number): BoardUnitRow {
  const part = i % 7;
  return {
    id: `u-${i}`, serial: `SN-${String(i % 50).padStart(3, "0")}${i >= 50 ? "b" : ""}`, version: 1, state: "green",
    green_mass_g: i % 3 === 0 ? 120 + i : null, brown_mass_g: null, wash_passed: null, hold_reason: null, wash_batch_id: null,
    furnace_run_id: i % 11 === 0 ? "run-1" : null,
    part_id: `part-${part}`, part_number: `PN-${part}`, part_name: "bracket", thickest_wall_mm: 2 + part, volume_mm3: part % 2 ? 12_000 : null,
    nominal_x_mm: 40, nominal_y_mm: 30, nominal_z_mm: 20, green_x_mm: part % 2 ? 48 : null, green_y_mm: null, green_z_mm: null,
    stock_x_neg_mm: 0.3, stock_x_pos_mm: 0.3, stock_y_neg_mm: 0, stock_y_pos_mm: 0, stock_z_neg_mm: 0, stock_z_pos_mm: 0.2,
    order_code: `O-${i % 13}`, due_at: new Date(base + (i % 13) * 9 * H), priority: 3,
    material_id: "m1", material_code: "17-4PH", default_profile_id: "p1", shrink_xy: 0.165, shrink_z: 0.19,
    green_density_g_cm3: 5.1, wash_k_min_per_mm2: 4, wash_min_minutes: 60, min_mass_loss: 0.04,
    wb_state: null, wb_starts_at: null, wb_ends_at: null,
    // A few green units already sit in a booked furnace run: that step keeps its own times.
    fr_state: i % 11 === 0 ? "scheduled" : null, fr_starts_at: i % 11 === 0 ? new Date(base + 30 * H) : null, fr_ends_at: i % 11 === 0 ? new Date(base + 50 * H) : null,
  };
}
const rows = Array.from({ length: 120 }, (_, i) => row(i));

/** The slack worked from scratch: the unit's steps at `now` through projectUnit. */
function slackFromScratch(r: BoardUnitRow, ctx: BoardUnitContext): number {
  const wash = washMinutes({ thickestWallMm: Number(r.thickest_wall_mm), kMinPerMm2: 4, minMinutes: 60 });
  const cycle = Math.ceil(
    furnaceCycle({ startTempC: 20, coolRateCPerMin: 5, coolToC: 100, segments: profile.segments.map((s) => ({ rateCPerMin: s.rate_c_per_min, setpointC: s.setpoint_c, holdMin: s.hold_min })) }).totalMinutes,
  );
  const furnace = r.fr_state === "scheduled" ? { status: "booked" as const, start: r.fr_starts_at!, end: r.fr_ends_at! } : { status: "unbooked" as const, minutes: cycle };
  const p = projectUnit({
    now: ctx.now, dueAt: new Date(r.due_at), atRiskMarginMinutes: ctx.at_risk_margin_minutes, staffing: staffing!,
    steps: {
      print: { status: "done", end: ctx.now },
      wash: { status: "unbooked", minutes: wash },
      drying: { status: "unbooked", minutes: ctx.drying_minutes },
      furnace,
      finishing: { status: "unbooked", minutes: ctx.finishing_lead_minutes },
    },
  });
  return Math.round(p.slackMinutes);
}

describe("board units prepared once, projected at each moment", () => {
  const prepared = rows.map((r) => prepareBoardUnit(r, ctxAt(base)));

  it("projects as the projection worked from scratch does, hours and a weekend later", () => {
    for (const later of [0, 5 * H, 31 * H, 60 * H]) {
      const ctx = ctxAt(base + later);
      for (const [i, r] of rows.entries()) {
        const u = projectBoardUnit(prepared[i], ctx);
        expect(u.slack_minutes).toBe(slackFromScratch(r, ctx));
        expect(u).toEqual(toBoardUnit(r, ctx));
      }
    }
  });

  it("ranks the most at risk as sorting every unit does, ties by due date, then serial", () => {
    for (const later of [0, 7 * H, 55 * H]) {
      const ctx = ctxAt(base + later);
      const all = rows.map((r) => toBoardUnit(r, ctx)).sort(byRisk);
      const lane = mostAtRisk(prepared, ctx, 25);
      expect(lane.total).toBe(rows.length);
      expect(lane.units).toEqual(all.slice(0, 25));
      expect(mostAtRisk(prepared, ctx, 1_000).units).toEqual(all);
    }
  });

  it("gives every answer its own list of compatible profiles", () => {
    const ctx = ctxAt(base);
    const [a, b] = [projectBoardUnit(prepared[0], ctx), projectBoardUnit(prepared[1], ctx)];
    expect(a.compatible_profile_ids).toEqual(["p1"]);
    a.compatible_profile_ids.push("changed");
    expect(b.compatible_profile_ids).toEqual(["p1"]);
    expect(projectBoardUnit(prepared[0], ctx).compatible_profile_ids).toEqual(["p1"]);
  });
});
