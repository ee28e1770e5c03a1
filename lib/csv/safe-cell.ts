// Every CSV Hearth writes goes through here. A spreadsheet opening the file runs any cell that
// starts with = + - @ (or a tab or carriage return before one) as a formula, and a customer name
// or a note is text anyone with an account typed. OWASP, "CSV Injection": prefix such a cell
// with a single quote, and enclose it in double quotes (doubling any inside). Only text is
// neutralised: a cell that holds a number value (-3.5) stays a number.
import Papa from "papaparse";

/** OWASP's list, plus line feed (a multi-line note's second line is read as a new cell by some readers). */
const FORMULA_START = /^[=+\-@\t\r\n]/;

export type CsvValue = string | number | boolean | null | undefined;

/** The cell as it should be written: text that could start a formula gets a leading quote. */
export function safeCell(value: CsvValue): string | number | boolean | null {
  if (value === undefined || value === null) return null;
  if (typeof value === "number") return Number.isFinite(value) ? value : null;
  if (typeof value === "boolean") return value;
  return FORMULA_START.test(value) ? `'${value}` : value;
}

/** The whole file: a header row of `fields` and one line per row, cells neutralised. */
export function toCsv(fields: readonly string[], rows: ReadonlyArray<Record<string, CsvValue>>): string {
  const data = rows.map((row) => fields.map((f) => safeCell(row[f])));
  return Papa.unparse(
    { fields: [...fields], data },
    {
      // A neutralised cell is always quoted, as OWASP asks; others only when they must be.
      quotes: (value: unknown) => typeof value === "string" && value.startsWith("'") && FORMULA_START.test(value.slice(1)),
      escapeFormulae: false,
      newline: "\r\n",
    },
  );
}
