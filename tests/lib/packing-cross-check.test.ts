// Cross-checks against exact optima: bin packing by load solved as a MILP with HiGHS, and
// zero-waste tray instances whose optimum is known by construction.

import { beforeAll, describe, expect, it } from "vitest";
import { packTrays } from "@/lib/packing/trays";
import type { PackUnit } from "@/lib/packing/types";
import { toInstanceRuns, verifyRuns } from "@/lib/planning/metrics";
import { prng, zeroWasteInstance } from "@/bench/generate-instances";

type Highs = { solve: (lp: string, opts?: Record<string, unknown>) => { Status: string; ObjectiveValue: number } };
let highs: Highs;

beforeAll(async () => {
  highs = (await (await import("highs")).default()) as unknown as Highs;
});

/** Minimum number of bins of capacity C for the weights (assignment MILP, symmetry broken). */
function optimalBins(weights: number[], C: number): number {
  const n = weights.length;
  const bins = n;
  const lines = ["Minimize", " obj: " + Array.from({ length: bins }, (_, k) => `y${k}`).join(" + "), "Subject To"];
  for (let i = 0; i < n; i++) lines.push(` a${i}: ` + Array.from({ length: bins }, (_, k) => `x${i}_${k}`).join(" + ") + " = 1");
  for (let k = 0; k < bins; k++) {
    lines.push(` c${k}: ` + weights.map((w, i) => `${w} x${i}_${k}`).join(" + ") + ` - ${C} y${k} <= 0`);
    if (k > 0) lines.push(` s${k}: y${k} - y${k - 1} <= 0`);
  }
  lines.push("Binaries");
  for (let k = 0; k < bins; k++) lines.push(` y${k}`);
  for (let i = 0; i < n; i++) for (let k = 0; k < bins; k++) lines.push(` x${i}_${k}`);
  lines.push("End");
  const res = highs.solve(lines.join("\n"), { output_flag: false, time_limit: 20 });
  if (res.Status !== "Optimal") throw new Error(`HiGHS: ${res.Status}`);
  return Math.round(res.ObjectiveValue);
}

describe("load-limited runs against the MILP optimum", () => {
  it("the packer never goes below the bound, the bound never above the optimum, and it mostly hits the optimum", () => {
    let hits = 0;
    const cases = 30;
    for (let seed = 1; seed <= cases; seed++) {
      const rnd = prng(seed);
      const n = 6 + (seed % 7);
      const masses = Array.from({ length: n }, () => 100 + Math.floor(rnd() * 500));
      // Footprints far too small to matter: this is bin packing by mass.
      const units: PackUnit[] = masses.map((m, i) => ({ id: `m${i}`, profile: "P", footprint_mm: [10, 10], height_mm: 10, mass_g: m, due: "2027-01-10T00:00:00Z" }));
      const inst = {
        clearance_mm: 2,
        furnaces: [{ id: "F", tray_mm: [1000, 1000] as [number, number], tray_count: 1, usable_height_mm: 100, max_load_g: 1000, profiles: ["P"] }],
        units,
      };
      const res = packTrays(inst);
      const opt = optimalBins(masses, 1000);
      expect(res.lowerBound.largest).toBeLessThanOrEqual(opt);
      expect(res.runs.length).toBeGreaterThanOrEqual(opt);
      for (const r of res.runs) expect(r.mass_g).toBeLessThanOrEqual(1000);
      if (res.runs.length === opt) hits++;
    }
    expect(hits / cases).toBeGreaterThanOrEqual(0.9);
  });
});

describe("zero-waste trays against their known optimum", () => {
  it("reaches ⌈trays / trays per run⌉ on most small instances and always checks out", () => {
    let hits = 0;
    let total = 0;
    for (const [trays, perRun] of [
      [2, 1],
      [3, 1],
      [4, 2],
      [5, 2],
      [6, 3],
    ] as const) {
      for (let seed = 1; seed <= 4; seed++) {
        const inst = zeroWasteInstance(seed * 97 + trays, { trays, trayCount: perRun });
        const res = packTrays(inst);
        expect(verifyRuns(inst, toInstanceRuns(res.runs), res.unplaced).violations).toEqual([]);
        expect(res.lowerBound.largest).toBeLessThanOrEqual(inst.known_optimum_runs);
        expect(res.runs.length).toBeGreaterThanOrEqual(inst.known_optimum_runs);
        if (res.runs.length === inst.known_optimum_runs) hits++;
        total++;
      }
    }
    expect(hits / total).toBeGreaterThanOrEqual(0.9);
  });
});
