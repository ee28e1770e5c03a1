import { describe, expect, it } from "vitest";
import { eddOrder, listSchedule, lptSchedule, sequenceMaxLateness } from "@/lib/planning/list-scheduling";
import { planPrinters } from "@/lib/planning/printer-plan";
import type { PrinterPlanInstanceInput } from "@/lib/planning/instances";

function permutations<T>(xs: T[]): T[][] {
  if (xs.length <= 1) return [xs];
  return xs.flatMap((x, i) => permutations([...xs.slice(0, i), ...xs.slice(i + 1)]).map((p) => [x, ...p]));
}

/** Optimal makespan on m identical machines by trying every assignment (small inputs only). */
function bruteForceMakespan(durations: number[], m: number): number {
  let best = Infinity;
  const loads = new Array<number>(m).fill(0);
  const go = (i: number) => {
    if (i === durations.length) {
      best = Math.min(best, Math.max(...loads));
      return;
    }
    for (let k = 0; k < m; k++) {
      loads[k] += durations[i];
      if (loads[k] < best) go(i + 1);
      loads[k] -= durations[i];
      if (loads[k] === 0) break; // empty machines are interchangeable
    }
  };
  go(0);
  return best;
}

// Jackson (1955), Research Report 43, UCLA: bibliographic details from memory.
describe("Jackson's rule: EDD minimises maximum lateness on one machine (Jackson 1955)", () => {
  const A = { id: "A", p: 3, due: 5 };
  const B = { id: "B", p: 2, due: 4 };
  const C = { id: "C", p: 4, due: 10 };
  // Worked example (computed by hand): L_max of every order of A(3, 5), B(2, 4), C(4, 10).
  const table: [string, number][] = [
    ["BAC", 0],
    ["ABC", 1],
    ["BCA", 4],
    ["CBA", 4],
    ["ACB", 5],
    ["CAB", 5],
  ];
  const byId = { A, B, C } as const;

  it("gives the tabulated L_max for all six orders", () => {
    for (const [order, lmax] of table) {
      expect(sequenceMaxLateness([...order].map((c) => byId[c as "A" | "B" | "C"]))).toBe(lmax);
    }
    expect(permutations([A, B, C])).toHaveLength(6);
  });

  it("EDD order is B-A-C and no order does better", () => {
    const edd = eddOrder([A, B, C]);
    expect(edd.map((j) => j.id).join("")).toBe("BAC");
    const best = Math.min(...permutations([A, B, C]).map(sequenceMaxLateness));
    expect(sequenceMaxLateness(edd)).toBe(best);
  });

  it("the printer planner reproduces it on a single printer (hours as the unit)", () => {
    const now = Date.parse("2027-01-04T06:00:00Z");
    const at = (h: number) => new Date(now + h * 3_600_000).toISOString();
    const inst: PrinterPlanInstanceInput = {
      kind: "printer-plan",
      name: "jackson",
      now: at(0),
      printers: [{ id: "P", materials: ["M"], build_volume_mm: [100, 100, 100], available_from: at(0), blocked: [] }],
      builds: [A, B, C].map((j) => ({ id: j.id, material: "M", size_mm: [10, 10, 10], duration_min: j.p * 60, due: at(j.due) })),
    };
    const res = planPrinters(inst);
    expect(res.assignments.map((a) => a.build)).toEqual(["B", "A", "C"]);
    expect(res.metrics.max_lateness_min).toBe(0);
    expect(res.metrics.makespan_min).toBe(9 * 60);
  });
});

// Graham (1969) volume, pages and the 1966 list-scheduling bound: from memory.
describe("Graham's LPT bound C_max(LPT)/C*_max ≤ 4/3 − 1/(3m) (Graham, SIAM J. Appl. Math. 17, 1969)", () => {
  // Tight instances (computed by hand): 2m+1 jobs 2m−1, 2m−1, …, m+1, m+1, m, m, m.
  it("m = 2, {3, 3, 2, 2, 2}: LPT 7 against an optimum of 6, exactly the bound 7/6", () => {
    const jobs = [3, 3, 2, 2, 2];
    expect(lptSchedule(jobs, 2).makespan).toBe(7);
    expect(bruteForceMakespan(jobs, 2)).toBe(6);
    expect(7 / 6).toBeCloseTo(4 / 3 - 1 / 6, 12);
  });

  it("m = 3, {5, 5, 4, 4, 3, 3, 3}: LPT 11 against 9, exactly 11/9", () => {
    const jobs = [5, 5, 4, 4, 3, 3, 3];
    expect(lptSchedule(jobs, 3).makespan).toBe(11);
    expect(bruteForceMakespan(jobs, 3)).toBe(9);
    expect(11 / 9).toBeCloseTo(4 / 3 - 1 / 9, 12);
  });

  it("{4, 5, 6, 7, 8} on two machines: LPT {8, 5, 4}, {7, 6} makes 17, the optimum 15 (Wikipedia, Longest-processing-time-first scheduling)", () => {
    const jobs = [4, 5, 6, 7, 8];
    const lpt = lptSchedule(jobs, 2);
    expect(lpt.makespan).toBe(17);
    const sets = lpt.machines.map((m) => m.map((j) => jobs[j]).sort((a, b) => b - a));
    expect(sets).toContainEqual([8, 5, 4]);
    expect(sets).toContainEqual([7, 6]);
    expect(bruteForceMakespan(jobs, 2)).toBe(15);
  });

  it("LPT stays within the bound on random instances", () => {
    let seed = 11;
    const rnd = () => ((seed = (seed * 16807) % 2147483647) / 2147483647);
    for (let t = 0; t < 200; t++) {
      const m = 2 + (t % 3);
      const jobs = Array.from({ length: 5 + (t % 5) }, () => 1 + Math.floor(rnd() * 20));
      const ratio = lptSchedule(jobs, m).makespan / bruteForceMakespan(jobs, m);
      expect(ratio).toBeLessThanOrEqual(4 / 3 - 1 / (3 * m) + 1e-12);
    }
  });

  it("plain list scheduling in the given order can be worse than LPT (Graham 1966: ≤ 2 − 1/m)", () => {
    const jobs = [2, 2, 2, 3, 3];
    expect(listSchedule(jobs, 2).makespan).toBe(7);
    expect(listSchedule(jobs, 2).makespan / 6).toBeLessThanOrEqual(2 - 1 / 2);
  });

  it("the printer planner's local search reaches the optimum on the tight instances", () => {
    for (const [jobs, m, opt] of [
      [[3, 3, 2, 2, 2], 2, 6],
      [[5, 5, 4, 4, 3, 3, 3], 3, 9],
      [[4, 5, 6, 7, 8], 2, 15],
    ] as [number[], number, number][]) {
      const now = "2027-01-04T00:00:00Z";
      const res = planPrinters({
        kind: "printer-plan",
        name: "graham",
        now,
        printers: Array.from({ length: m }, (_, i) => ({ id: `P${i}`, materials: ["M"], build_volume_mm: [100, 100, 100] as [number, number, number], blocked: [] })),
        builds: jobs.map((h, i) => ({ id: `b${i}`, material: "M", size_mm: [10, 10, 10] as [number, number, number], duration_min: h * 60, due: "2027-02-01T00:00:00Z" })),
      });
      expect(res.lowerBound.makespan_min).toBeLessThanOrEqual(opt * 60);
      expect(res.metrics.makespan_min).toBe(opt * 60);
    }
  });
});
