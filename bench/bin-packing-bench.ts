// The 2-D bin-packing section: the ten published instance classes (bin-packing-classes.ts) with
// n = 20…100, each solved by the tray packer as it ships (constructions + run-removing search)
// and by the constructions alone (the packer before the search was added), both against the
// strongest lower bound the packer computes (TrayLowerBound.largest). Every plan is checked.
//
// HEARTH_BENCH_2BP_INSTANCES sets the instances per class and n (default 10);
// HEARTH_BENCH_2BP_DEADLINE_MS the search's deadline per instance (default 900 ms: the packer is
// anytime, and the target is a plan within 1 s on a shared machine; 0 = work budget only).

import { packTraysReported } from "@/lib/packing/trays";
import { toInstanceRuns, verifyRuns } from "@/lib/planning/metrics";
import { asTrayInstance, binInstance, CLASS_NAMES } from "./bin-packing-classes";
import os from "node:os";
import type { BenchRow, BenchSection } from "./types";

const SIZES = [20, 40, 60, 80, 100] as const;
const round = (x: number, d = 3) => Math.round(x * 10 ** d) / 10 ** d;

interface Cell {
  cls: string;
  n: number;
  count: number;
  bound: number;
  oldBins: number;
  newBins: number;
  /** Instances the search took more than one bin above the bound. */
  overOne: number;
  worse: number;
  invalid: number;
  msNew: number[];
  msOld: number[];
  atBound: number;
}

export function runBinPackingBench(perCell: number, log: (line: string) => void = console.log, deadlineMs = 900): Cell[] {
  const cells: Cell[] = [];
  const overOne: string[] = [];
  const load0 = os.loadavg()[0];
  for (const cls of CLASS_NAMES) {
    for (const n of SIZES) {
      const cell: Cell = { cls, n, count: 0, bound: 0, oldBins: 0, newBins: 0, overOne: 0, worse: 0, invalid: 0, msNew: [], msOld: [], atBound: 0 };
      for (let seed = 1; seed <= perCell; seed++) {
        const inst = asTrayInstance(binInstance(cls, n, seed));
        let t0 = performance.now();
        const before = packTraysReported(inst, { search: false });
        cell.msOld.push(performance.now() - t0);
        t0 = performance.now();
        const after = packTraysReported(inst, { search: deadlineMs > 0 ? { seed, deadlineMs } : { seed } });
        cell.msNew.push(performance.now() - t0);
        const lb = after.result.lowerBound.largest;
        for (const r of [before.result, after.result]) {
          if (!verifyRuns(inst, toInstanceRuns(r.runs), r.unplaced).ok) cell.invalid++;
        }
        cell.count++;
        cell.bound += lb;
        cell.oldBins += before.result.runs.length;
        cell.newBins += after.result.runs.length;
        if (after.result.runs.length > lb + 1) {
          cell.overOne++;
          overOne.push(`${cls} n=${n} seed ${seed}: ${after.result.runs.length} bins, bound ${lb}`);
        }
        if (after.result.runs.length > before.result.runs.length) cell.worse++;
        if (after.result.runs.length === lb) cell.atBound++;
      }
      cells.push(cell);
    }
  }
  const mean = (xs: number[]) => xs.reduce((s, x) => s + x, 0) / xs.length;
  const header = ["class", "n", "inst", "bound Σ", "today Σ", "new Σ", "today/bound", "new/bound", "excess today", "excess new", "at bound", ">1 over", "ms today", "ms new (mean/max)"];
  const rows = cells.map((c) => [
    c.cls,
    c.n,
    c.count,
    c.bound,
    c.oldBins,
    c.newBins,
    round(c.oldBins / c.bound).toFixed(3),
    round(c.newBins / c.bound).toFixed(3),
    c.oldBins - c.bound,
    c.newBins - c.bound,
    c.atBound,
    c.overOne,
    mean(c.msOld).toFixed(0),
    `${mean(c.msNew).toFixed(0)}/${Math.max(...c.msNew).toFixed(0)}`,
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...rows.map((r) => String(r[i]).length)));
  log(header.map((h, i) => h.padEnd(widths[i])).join("  "));
  for (const r of rows) log(r.map((v, i) => String(v).padEnd(widths[i])).join("  "));
  // Per class, all n together.
  log("");
  log("class  bound Σ  today Σ  new Σ  excess today  excess new  at bound  >1 over");
  for (const cls of CLASS_NAMES) {
    const cs = cells.filter((c) => c.cls === cls);
    const sum = (f: (c: Cell) => number) => cs.reduce((acc, c) => acc + f(c), 0);
    log(
      [cls.padEnd(5), String(sum((c) => c.bound)).padEnd(7), String(sum((c) => c.oldBins)).padEnd(7), String(sum((c) => c.newBins)).padEnd(5), String(sum((c) => c.oldBins - c.bound)).padEnd(12), String(sum((c) => c.newBins - c.bound)).padEnd(10), String(sum((c) => c.atBound)).padEnd(8), sum((c) => c.overOne)].join("  "),
    );
  }
  if (overOne.length > 0) log(`more than one bin above the bound: ${overOne.join("; ")}`);
  log(`load average (1 min) at start ${load0.toFixed(2)}, at end ${os.loadavg()[0].toFixed(2)}; search deadline ${deadlineMs > 0 ? `${deadlineMs} ms` : "none"}`);
  return cells;
}

export const section: BenchSection = {
  name: "bin-packing",
  async run() {
    const perCell = Number(process.env.HEARTH_BENCH_2BP_INSTANCES ?? 10);
    const deadlineMs = Number(process.env.HEARTH_BENCH_2BP_DEADLINE_MS ?? 900);
    const cells = runBinPackingBench(perCell, console.log, deadlineMs);
    const rows: BenchRow[] = [];
    for (const c of cells) {
      rows.push({
        section: "bin-packing",
        name: `class ${c.cls} n=${c.n} (${c.count} inst)`,
        metric: "bins / bound (today's)",
        value: round(c.newBins / c.bound),
        ms: round(Math.max(...c.msNew), 1),
        ok: c.invalid === 0 && c.worse === 0,
        detail: { bound: c.bound, today: c.oldBins, new: c.newBins, today_ratio: round(c.oldBins / c.bound), over_one: c.overOne, at_bound: c.atBound },
      });
    }
    const sum = (f: (c: Cell) => number) => cells.reduce((s, c) => s + f(c), 0);
    const exOld = sum((c) => c.oldBins - c.bound);
    const exNew = sum((c) => c.newBins - c.bound);
    rows.push({ section: "bin-packing", name: "total excess over the bound, today's packer", metric: "bins", value: exOld });
    rows.push({ section: "bin-packing", name: "total excess over the bound, new packer", metric: "bins", value: exNew, target: `≤ ${round(exOld / 3, 1)} (⅓ of today's)`, ok: exNew <= exOld / 3 });
    rows.push({
      section: "bin-packing",
      name: "instances more than one bin above the bound",
      metric: "count",
      value: sum((c) => c.overOne),
      target: "0",
      ok: sum((c) => c.overOne) === 0,
      detail: { by_class: Object.fromEntries(CLASS_NAMES.map((k) => [k, cells.filter((c) => c.cls === k).reduce((s, c) => s + c.overOne, 0)])), bound_known_weak: ["VII", "VIII"] },
    });
    rows.push({ section: "bin-packing", name: "instances where the new packer uses more bins", metric: "count", value: sum((c) => c.worse), target: "0", ok: sum((c) => c.worse) === 0 });
    rows.push({ section: "bin-packing", name: "plans failing the check", metric: "count", value: sum((c) => c.invalid), target: "0", ok: sum((c) => c.invalid) === 0 });
    const slow100 = Math.max(...cells.filter((c) => c.n === 100).flatMap((c) => c.msNew));
    rows.push({ section: "bin-packing", name: "slowest 100-item instance", metric: "ms", value: round(slow100, 1), target: "≤ 1000", ok: slow100 <= 1000 });
    return rows;
  },
};
