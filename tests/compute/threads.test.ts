// The planners' compute threads (db/compute/threads.ts): a job gives the same answer on its thread
// as on the caller's, an input the computation refuses comes back as the same ComputationError
// (so a route answers 422 with the field), and the caller's event loop keeps turning while a
// search spends its whole budget, which is why the threads exist.
import { describe, expect, it } from "vitest";
import { runOnComputeThread } from "@/db/compute/threads";
import { planFloor, type PlanInput } from "@/lib/floor/plan";
import { ComputationError, isAppError } from "@/lib/errors";
import { prng } from "@/bench/generate-instances";
import { binInstance } from "@/bench/bin-packing-classes";
import type { SuggestInput } from "@/lib/batches/suggest";
import type { BoardFurnace, BoardProfile, BoardUnit } from "@/lib/batches/types";

const PROFILE: BoardProfile = {
  id: "p1", code: "A", revision: 1, label: "A r1", name: "A", atmosphere: "H2", start_temp_c: 20, cool_rate_c_per_min: 10, cool_to_c: 100,
  material_ids: ["m1"], segments: [{ position: 0, rate_c_per_min: 5, setpoint_c: 600, hold_min: 60 }, { position: 1, rate_c_per_min: 5, setpoint_c: 1350, hold_min: 120 }],
};
const FURNACE: BoardFurnace = { id: "f1", name: "Kiln", tray_x_mm: 100, tray_y_mm: 100, tray_count: 1, usable_height_mm: 100, max_load_g: 1e9, max_cool_rate_c_per_min: 10, profile_ids: ["p1"] };

/** Brown units waiting for the furnace with the given footprints, no clearance. */
function suggestInput(items: { w: number; h: number }[], budgetMs: number): SuggestInput {
  const units: BoardUnit[] = items.map((it, i) => ({
    id: `u${i}`, serial: `U-${i}`, version: 1, state: "brown", part_id: "pt", part_number: "P", part_name: "part", order_code: "WO", due_at: "2027-01-20T00:00:00Z",
    priority: 3, material_id: "m1", material_code: "M1", profile_id: "p1", compatible_profile_ids: ["p1"], green_x_mm: it.w, green_y_mm: it.h, green_z_mm: 5, mass_g: 1, mass_source: "brown",
    green_mass_g: 1, brown_mass_g: 1, wash_passed: true, min_mass_loss: 0.035, thickest_wall_mm: 4, wash_minutes: 60, wash_k_min_per_mm2: 30, wash_min_minutes: 60,
    wash_batch_id: null, furnace_run_id: null, ready_at: null, slack_minutes: 100, projection_status: "on_time", hold_reason: null,
  }));
  return {
    now: new Date("2027-01-04T06:00:00Z"), staffing: null, clearance_mm: 0, drying_minutes: 0, finishing_lead_minutes: 0, wash: false, furnace: true, busy: [],
    furnaces: [FURNACE], stations: [], profiles: [PROFILE], wash_units: [], furnace_units: units, search_budget_ms: budgetMs,
  };
}

/** A printer queue large enough that the lateness search is still improving when its budget ends. */
function busyFloor(builds: number, seed: number): PlanInput {
  const rnd = prng(seed);
  const now = Date.UTC(2027, 0, 4, 6);
  const printers = ["P1", "P2", "P3", "P4"].map((id) => ({ id, blocked: [] as Array<[number, number]> }));
  return {
    now,
    printers,
    builds: Array.from({ length: builds }, (_, i) => {
      const minutes: Record<string, number> = {};
      for (const p of printers) if (rnd() < 0.7) minutes[p.id] = 60 + Math.floor(rnd() * 900);
      if (!Object.keys(minutes).length) minutes.P1 = 120;
      return { id: `b${i}`, due: now + Math.floor(rnd() * 20 * 86_400_000), minutes };
    }),
  };
}

describe("compute threads", () => {
  it("give the same plan as the caller's own thread", async () => {
    const input = busyFloor(40, 3);
    const here = planFloor(input);
    const there = await runOnComputeThread("floor", input);
    expect(there).toEqual(here);
    expect(there.items.length).toBe(40);
  }, 30_000);

  it("hand back a refused input as a ComputationError with its field", async () => {
    const err = await runOnComputeThread("floor", { ...busyFloor(2, 1), now: Number.NaN }).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(ComputationError);
    expect(isAppError(err) && err.status).toBe(422);
    expect((err as ComputationError).field).toBe("now");
  }, 30_000);

  it("leave the caller's event loop free while a search spends its budget", async () => {
    // Pieces long one way (class VII of Martello & Vigo 1998, bench/bin-packing-classes.ts), 100
    // of them, on one 100 × 100 mm tray: a queue the tray search does not close within the budget.
    const budget = 2_000;
    const input = suggestInput(binInstance("VII", 100, 10).items, budget);
    let last = performance.now();
    let worstGap = 0;
    const tick = setInterval(() => {
      const t = performance.now();
      worstGap = Math.max(worstGap, t - last);
      last = t;
    }, 10);
    const t0 = performance.now();
    const result = await runOnComputeThread("suggest", input, budget);
    const took = performance.now() - t0;
    clearInterval(tick);
    // The time since the last tick counts too (a blocked loop may not have ticked at all).
    worstGap = Math.max(worstGap, performance.now() - last);
    // The search really spent its budget, of time or of the work that time allows (else this
    // shows nothing) ...
    expect(["time", "budget"]).toContain(result.metrics.search.stop);
    expect(took).toBeGreaterThan(budget / 2);
    expect(result.furnace.flatMap((r) => r.units)).toHaveLength(100);
    // ... and the timer kept firing meanwhile: on the caller's thread the gap would be the whole
    // search. A generous margin for a shared, busy machine.
    expect(worstGap).toBeLessThan(took / 4);
  }, 60_000);

  it("stop a thread that overruns, answer 503, and start a new one for the next job", async () => {
    const before = process.env.HEARTH_COMPUTE_GRACE_MS;
    process.env.HEARTH_COMPUTE_GRACE_MS = "100";
    try {
      // The search may take 3 s, but the thread is told 100 ms (+100 ms grace): it counts as stuck.
      const t0 = performance.now();
      const err = await runOnComputeThread("suggest", suggestInput(binInstance("VII", 100, 10).items, 3_000), 100).catch((e: unknown) => e);
      expect(isAppError(err) && err.status).toBe(503);
      expect(performance.now() - t0).toBeLessThan(2_500);
    } finally {
      if (before === undefined) delete process.env.HEARTH_COMPUTE_GRACE_MS;
      else process.env.HEARTH_COMPUTE_GRACE_MS = before;
    }
    // The next job gets a fresh thread and its answer.
    const input = busyFloor(10, 5);
    expect(await runOnComputeThread("floor", input)).toEqual(planFloor(input));
  }, 60_000);
});
