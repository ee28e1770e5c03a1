"use client";

import Papa from "papaparse";
import { useState } from "react";
import { CSV_COLUMNS, CSV_REQUIRED, type RowResult } from "@/lib/parts/schemas";
import { ApiError, apiJson } from "@/components/floor/api";

type Outcome = { ok: boolean; imported_parts: number; created_orders: number; valid: number; invalid: number; results: RowResult[] };

export type CsvImportProps = { onImported: (message: string) => void };

const TEMPLATE = `${CSV_COLUMNS.join(",")}\nWO-9001,Example Pumps,,2027-01-15,3,EX-100,A,pump bracket,17-4PH,2,60,40,25,6,0.3,0.3,0,0,0,0.2,Grind datum face,1.6,,IT7\n`;

/**
 * CSV of orders and parts: parsed in the browser with papaparse, every row checked by the
 * server (shape, material, duplicates), shown as a preview with each row's errors, then
 * imported whole, or valid rows only when the person chooses that.
 */
export function CsvImport({ onImported }: CsvImportProps) {
  const [fileName, setFileName] = useState<string | null>(null);
  const [rows, setRows] = useState<Record<string, string>[]>([]);
  const [headers, setHeaders] = useState<string[]>([]);
  const [check, setCheck] = useState<Outcome | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function onFile(file: File) {
    setError(null);
    setCheck(null);
    setFileName(file.name);
    const text = await file.text();
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: "greedy", transformHeader: (h) => h.trim().toLowerCase() });
    if (parsed.errors.length) {
      const e = parsed.errors[0];
      setError(`The file is not valid CSV: ${e.message}${e.row !== undefined ? ` (line ${e.row + 2})` : ""}.`);
      setRows([]);
      return;
    }
    const missing = CSV_REQUIRED.filter((c) => !(parsed.meta.fields ?? []).includes(c));
    if (missing.length) {
      setError(`Missing column${missing.length > 1 ? "s" : ""}: ${missing.join(", ")}. Download the template for the expected header.`);
      setRows([]);
      return;
    }
    setHeaders(parsed.meta.fields ?? []);
    setRows(parsed.data);
    await send(parsed.data, "all", true);
  }

  async function send(data: Record<string, string>[], mode: "all" | "valid_only", dryRun: boolean) {
    setBusy(true);
    setError(null);
    try {
      const res = await apiJson<Outcome>("/api/parts/import", { method: "POST", body: { rows: data, mode, dry_run: dryRun } });
      if (dryRun) setCheck(res);
      else {
        onImported(`Imported ${res.imported_parts} part${res.imported_parts === 1 ? "" : "s"}${res.created_orders ? ` and ${res.created_orders} new order${res.created_orders === 1 ? "" : "s"}` : ""}${res.invalid ? `; ${res.invalid} row${res.invalid === 1 ? "" : "s"} with errors left out` : ""}.`);
        setRows([]);
        setCheck(null);
        setFileName(null);
      }
    } catch (err) {
      const e = err as ApiError;
      const details = e.details as unknown as Outcome | undefined;
      if (details?.results) setCheck(details);
      setError(e.message);
    } finally {
      setBusy(false);
    }
  }

  const resultByRow = new Map(check?.results.map((r) => [r.row, r]) ?? []);
  const shownCols = headers.filter((h) => ["order_code", "customer", "due_date", "part_number", "revision", "name", "material", "quantity", "nominal_x_mm", "nominal_y_mm", "nominal_z_mm", "thickest_wall_mm"].includes(h));

  return (
    <div className="space-y-3" data-testid="csv-import">
      <div className="flex flex-wrap items-center gap-3">
        <label className="rounded-md border border-clay-400 px-3 py-1.5 text-sm font-semibold text-clay-700 hover:bg-clay-50">
          Choose CSV file
          <input type="file" accept=".csv,text/csv" className="sr-only" data-testid="csv-file" onChange={(e) => e.target.files?.[0] && onFile(e.target.files[0])} />
        </label>
        <a className="text-sm text-clay-700 underline" href={`data:text/csv;charset=utf-8,${encodeURIComponent(TEMPLATE)}`} download="hearth-parts-template.csv">
          Download the template
        </a>
        {fileName ? <span className="text-sm text-soot-600">{fileName}: {rows.length} row{rows.length === 1 ? "" : "s"}</span> : null}
      </div>
      <p className="text-xs text-soot-500">
        One row per part; rows with the same order code make one order (a new one, or parts added to an existing one). Dates as YYYY-MM-DD, sizes in mm, the material by its code.
      </p>
      {error ? <p role="alert" className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700" data-testid="csv-error">{error}</p> : null}
      {check ? (
        <div className={`rounded-md px-3 py-2 text-sm ${check.invalid ? "bg-brass-100 text-brass-600" : "bg-verdigris-100 text-verdigris-700"}`} data-testid="csv-summary">
          {check.valid} row{check.valid === 1 ? "" : "s"} ready, {check.invalid} with errors.
          {check.invalid ? " Nothing is imported while any row has an error, unless you import the valid rows only." : ""}
        </div>
      ) : null}
      {rows.length ? (
        <div className="max-h-96 overflow-auto rounded-md border border-soot-200" role="region" aria-label="Import preview" tabIndex={0}>
          <table className="w-full text-left text-xs" data-testid="csv-preview">
            <thead className="sticky top-0 bg-soot-50 text-soot-500">
              <tr>
                <th className="px-2 py-1">Line</th>
                <th className="px-2 py-1">Check</th>
                {shownCols.map((h) => (
                  <th key={h} className="px-2 py-1">{h}</th>
                ))}
              </tr>
            </thead>
            <tbody>
              {rows.map((r, i) => {
                const res = resultByRow.get(i + 2);
                return (
                  <tr key={i} className={`border-t border-soot-100 align-top ${res && !res.ok ? "bg-oxide-100/60" : ""}`} data-line={i + 2} data-ok={res ? String(res.ok) : undefined}>
                    <td className="px-2 py-1 tabular text-soot-500">{i + 2}</td>
                    <td className="min-w-56 px-2 py-1">
                      {!res ? "…" : res.ok ? <span className="font-semibold text-verdigris-700">ok{res.creates_order ? " · new order" : ""}</span> : (
                        <ul className="space-y-0.5 text-oxide-700">
                          {Object.entries(res.errors).map(([f, msgs]) => (
                            <li key={f}><span className="font-semibold">{f}</span>: {msgs.join("; ")}</li>
                          ))}
                        </ul>
                      )}
                    </td>
                    {shownCols.map((h) => (
                      <td key={h} className={`px-2 py-1 ${res?.errors[h] ? "font-semibold text-oxide-700" : ""}`}>{r[h]}</td>
                    ))}
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      ) : null}
      {check && rows.length ? (
        <div className="flex flex-wrap gap-2">
          <button type="button" disabled={busy || check.invalid > 0} onClick={() => send(rows, "all", false)} className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
            Import all {rows.length} rows
          </button>
          {check.invalid > 0 && check.valid > 0 ? (
            <button type="button" disabled={busy} onClick={() => send(rows, "valid_only", false)} className="rounded-md border border-clay-500 px-3 py-1.5 text-sm font-semibold text-clay-700 hover:bg-clay-50 disabled:opacity-50">
              Import the {check.valid} valid rows only
            </button>
          ) : null}
        </div>
      ) : null}
    </div>
  );
}
