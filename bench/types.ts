// The contract between bench/run.ts and its sections. A section returns rows; the runner prints
// them as one table and writes them to bench/results.json.

export interface BenchRow {
  /** Section name, e.g. "packing". */
  section: string;
  /** What was measured, e.g. "furnace mix s1 (1000 units)". */
  name: string;
  /** The figure, e.g. "runs / lower bound" or "MB/s". */
  metric: string;
  value: number | null;
  /** Human-readable target such as "≤ 1.02" (omit when there is none). */
  target?: string;
  /** Whether the value meets the target (omit when there is no target). */
  ok?: boolean;
  /** Wall-clock time of the measured call in ms, when that is not the figure itself. */
  ms?: number;
  /** Anything else worth keeping in results.json (counts, bounds, baselines). */
  detail?: Record<string, unknown>;
}

export interface BenchSection {
  name: string;
  run: () => Promise<BenchRow[]>;
}
