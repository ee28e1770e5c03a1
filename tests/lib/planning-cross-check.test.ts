// Small printer plans against the exact minimum makespan from a MILP solved with HiGHS.

import { beforeAll, describe, expect, it } from "vitest";
import type { PrinterPlanInstance } from "@/lib/planning/instances";
import { planPrinters } from "@/lib/planning/printer-plan";
import { prng } from "@/bench/generate-instances";

type Highs = { solve: (lp: string, opts?: Record<string, unknown>) => { Status: string; ObjectiveValue: number } };
let highs: Highs;

beforeAll(async () => {
  highs = (await (await import("highs")).default()) as unknown as Highs;
});

/**
 * min C subject to: each build on one compatible printer; printer i's work plus its start offset
 * ≤ C. Exact for instances without blocked windows or staffed hours (the order on a printer then
 * does not matter for the makespan).
 */
function optimalMakespan(offsets: number[], durations: number[], compat: number[][]): number {
  const lines = ["Minimize", " obj: C", "Subject To"];
  durations.forEach((_, b) => lines.push(` a${b}: ` + compat[b].map((i) => `x${b}_${i}`).join(" + ") + " = 1"));
  offsets.forEach((off, i) => {
    const terms = durations.map((p, b) => (compat[b].includes(i) ? `${p} x${b}_${i}` : null)).filter(Boolean);
    if (terms.length) lines.push(` l${i}: ` + terms.join(" + ") + ` - C <= ${-off}`);
  });
  lines.push("Bounds", " C >= 0", "Binaries");
  durations.forEach((_, b) => compat[b].forEach((i) => lines.push(` x${b}_${i}`)));
  lines.push("End");
  const res = highs.solve(lines.join("\n"), { output_flag: false, time_limit: 20 });
  if (res.Status !== "Optimal") throw new Error(`HiGHS: ${res.Status}`);
  return res.ObjectiveValue;
}

describe("printer assignment against the MILP optimum", () => {
  // With one common due date the planner's lateness cap (no worse than plain EDD) is the same as
  // not lengthening the makespan, so its optimum is the MILP's. With spread due dates the cap can
  // hold it above the optimum, but never below.
  for (const commonDue of [true, false]) {
    it(`${commonDue ? "one due date" : "spread due dates"}: never beats the optimum, the bound never exceeds it${commonDue ? ", and it mostly reaches it" : ""}`, () => {
      check(commonDue);
    });
  }
});

function check(commonDue: boolean): void {
  const T0 = Date.parse("2027-01-04T06:00:00Z");
  let hits = 0;
  const cases = 24;
  for (let seed = 1; seed <= cases; seed++) {
    const rnd = prng(seed);
    const m = 2 + (seed % 2);
    const n = 5 + (seed % 5);
    const mats = ["A", "B", "C"];
    const offsets = Array.from({ length: m }, () => 60 * Math.floor(rnd() * 5));
    const printers = offsets.map((off, i) => ({
      id: `P${i}`,
      materials: i === 0 ? mats : mats.filter(() => rnd() < 0.6).concat(mats[i % 3]),
      build_volume_mm: [300, 300, 300] as [number, number, number],
      available_from: new Date(T0 + off * 60_000).toISOString(),
      blocked: [],
    }));
    const builds = Array.from({ length: n }, (_, b) => ({
      id: `b${b}`,
      material: mats[Math.floor(rnd() * 3)],
      size_mm: [50, 50, 50] as [number, number, number],
      duration_min: 60 * (1 + Math.floor(rnd() * 12)),
      due: new Date(T0 + (commonDue ? 100 : 2 + rnd() * 40) * 3_600_000).toISOString(),
    }));
    const inst: PrinterPlanInstance = { kind: "printer-plan", name: `x${seed}`, now: new Date(T0).toISOString(), printers, builds };
    const compat = builds.map((b) => printers.map((p, i) => (p.materials.includes(b.material) ? i : -1)).filter((i) => i >= 0));
    const opt = optimalMakespan(
      offsets,
      builds.map((b) => b.duration_min),
      compat,
    );
    const res = planPrinters(inst);
    expect(res.lowerBound.makespan_min).toBeLessThanOrEqual(opt + 1e-6);
    expect(res.metrics.makespan_min).toBeGreaterThanOrEqual(opt - 1e-6);
    if (Math.abs(res.metrics.makespan_min - opt) < 1e-6) hits++;
  }
  if (commonDue) expect(hits / cases).toBeGreaterThanOrEqual(0.8);
}
