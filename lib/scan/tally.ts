// The running count while a furnace run is loaded unit by unit: which units the run expected,
// which are on it, which it still misses and which were scanned without being expected.

export type ScanOutcome = { serial: string; unit_id: string | null; status: "loaded" | "added" | "refused"; reason?: string };

export type Tally = {
  expected: string[];
  loaded: string[];
  missing: string[];
  /** Scanned, not on the run's list when loading began, and put on the run. */
  unexpected: ScanOutcome[];
  /**
   * Scanned and refused by the server (an unknown code, a unit another role or another profile
   * may not go on this run, a full tray), each with its reason: none of them is on the run, so
   * they are neither loaded nor unexpected units.
   */
  refused: ScanOutcome[];
};

/**
 * expected: the serials on the run when loading began; onRun: the serials on it now (as the
 * server last answered); scans: every scan in order, newest last. A unit scanned twice counts once,
 * with its last outcome.
 */
export function tallyOf(expected: string[], onRun: string[], scans: ScanOutcome[]): Tally {
  const last = new Map<string, ScanOutcome>();
  for (const s of scans) last.set(s.serial, s);
  const expectedSet = new Set(expected);
  const onRunSet = new Set(onRun);
  const loaded = [...last.values()].filter((s) => s.status !== "refused" && onRunSet.has(s.serial)).map((s) => s.serial);
  const loadedSet = new Set(loaded);
  return {
    expected: [...expected],
    loaded,
    missing: expected.filter((s) => !loadedSet.has(s)),
    unexpected: [...last.values()].filter((s) => s.status !== "refused" && !expectedSet.has(s.serial)),
    refused: [...last.values()].filter((s) => s.status === "refused"),
  };
}
