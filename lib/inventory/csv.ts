import { toCsv } from "@/lib/csv/safe-cell";
import type { RecallResult } from "./types";

// Genealogy and recall lists as CSV, through the shared formula guard (lib/csv/safe-cell.ts,
// OWASP "CSV Injection"). Papa's own escapeFormulae misses a formula followed by a line break.

export function toSafeCsv(rows: Array<Record<string, string | number | boolean | null>>, columns: string[]): string {
  return toCsv(columns, rows);
}

export type GenealogyCsvRow = {
  serial: string; state: string; build_code: string; printer: string | null; wash_batch_code: string | null; furnace_run_code: string | null;
  profile_code: string | null; inspections: number; passed: boolean | null; part_number: string; order_code: string; customer: string;
};

export const GENEALOGY_COLUMNS = ["serial", "state", "part_number", "order_code", "customer", "build_code", "printer", "wash_batch_code", "furnace_run_code", "profile_code", "inspections", "passed"];

export const genealogyCsv = (rows: GenealogyCsvRow[]) => toSafeCsv(rows, GENEALOGY_COLUMNS);

export const recallCsv = (r: RecallResult) =>
  toSafeCsv(
    [...r.held.map((u) => ({ serial: u.serial, action: "put on hold", was: u.from, order_code: "", customer: "" })), ...r.beyond_reach.map((u) => ({ serial: u.serial, action: "beyond reach: trace it", was: u.state, order_code: u.order_code, customer: u.customer }))],
    ["serial", "action", "was", "order_code", "customer"],
  );
