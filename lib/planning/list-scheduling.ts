// Classic single- and parallel-machine rules the printer planner builds on, kept small and
// separate so that they can be checked against their published worked examples.

import { ComputationError } from "@/lib/errors";

export interface SequencedJob {
  id: string;
  /** Processing time. */
  p: number;
  /** Due date, same unit and origin as the start time 0. */
  due: number;
}

/** Earliest due date first (Jackson 1955 [from memory]); ties by id so that the order is reproducible. */
export function eddOrder<T extends SequencedJob>(jobs: readonly T[]): T[] {
  return [...jobs].sort((a, b) => a.due - b.due || (a.id < b.id ? -1 : a.id > b.id ? 1 : 0));
}

/** Maximum lateness max(C_j − d_j) of jobs run back to back from time 0 in the given order. */
export function sequenceMaxLateness(jobs: readonly SequencedJob[]): number {
  if (jobs.length === 0) throw new ComputationError("maximum lateness of an empty sequence is undefined", "jobs");
  let t = 0;
  let worst = Number.NEGATIVE_INFINITY;
  for (const j of jobs) {
    if (!(j.p >= 0) || !Number.isFinite(j.p)) throw new ComputationError(`job ${j.id} has an invalid duration`, "p");
    t += j.p;
    worst = Math.max(worst, t - j.due);
  }
  return worst;
}

export interface ListSchedule {
  /** Job indices per machine, in start order. */
  machines: number[][];
  loads: number[];
  makespan: number;
}

/** Graham's list scheduling: each job in `order` goes to the machine that is free first. */
export function listSchedule(durations: readonly number[], m: number, order?: readonly number[]): ListSchedule {
  if (!Number.isInteger(m) || m < 1) throw new ComputationError("machine count must be a whole number ≥ 1", "m");
  for (const d of durations) {
    if (!(d >= 0) || !Number.isFinite(d)) throw new ComputationError("durations must be finite and ≥ 0", "durations");
  }
  const machines: number[][] = Array.from({ length: m }, () => []);
  const loads = new Array<number>(m).fill(0);
  for (const j of order ?? durations.map((_, i) => i)) {
    let k = 0;
    for (let i = 1; i < m; i++) if (loads[i] < loads[k]) k = i;
    machines[k].push(j);
    loads[k] += durations[j];
  }
  return { machines, loads, makespan: Math.max(0, ...loads) };
}

/** Longest processing time first (Graham 1969 [from memory]): C_max(LPT) ≤ (4/3 − 1/(3m))·C*_max. */
export function lptSchedule(durations: readonly number[], m: number): ListSchedule {
  const order = durations.map((_, i) => i).sort((a, b) => durations[b] - durations[a] || a - b);
  return listSchedule(durations, m, order);
}
