"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import { useState } from "react";
import { RecordForm, type FieldDef } from "./record-form";

export type Column = { key: string; label: string; align?: "right"; render?: (row: Record<string, unknown>) => React.ReactNode };

export type RecordTableProps = {
  title: string;
  noun: string;
  rows: Record<string, unknown>[];
  columns: Column[];
  fields: FieldDef[];
  endpoint: string;
  blank: Record<string, unknown>;
  toForm: (row: Record<string, unknown>) => Record<string, unknown>;
};

/** A set-up table with an inline editor per row and an "Add" form. */
export function RecordTable({ title, noun, rows, columns, fields, endpoint, blank, toForm }: RecordTableProps) {
  const [editing, setEditing] = useState<string | null>(null);
  return (
    <section className="rounded-card bg-white p-5 shadow-card" aria-label={title}>
      <div className="mb-3 flex items-center justify-between">
        <h2 className="font-display text-lg font-semibold">{title}</h2>
        <button type="button" onClick={() => setEditing(editing === "new" ? null : "new")} className="rounded-md border border-clay-300 px-3 py-1 text-sm font-semibold text-clay-700 hover:bg-clay-50">
          Add {noun}
        </button>
      </div>
      {editing === "new" ? (
        <div className="mb-4">
          <RecordForm title={`New ${noun}`} fields={fields} initial={blank} endpoint={endpoint} method="POST" submitLabel={`Add ${noun}`} onDone={() => setEditing(null)} />
        </div>
      ) : null}
      <ScrollRegion label={`${noun[0].toUpperCase()}${noun.slice(1)} list`}><table className="w-full text-sm">
        <thead>
          <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-500">
            {columns.map((c) => (
              <th key={c.key} className={`px-2 py-1.5 font-semibold ${c.align === "right" ? "text-right" : ""}`}>
                {c.label}
              </th>
            ))}
            <th className="w-16" />
          </tr>
        </thead>
        <tbody>
          {rows.map((row) => {
            const id = String(row.id);
            return [
              <tr key={id} className="border-b border-soot-100">
                {columns.map((c) => (
                  <td key={c.key} className={`px-2 py-1.5 ${c.align === "right" ? "tabular text-right" : ""}`}>
                    {c.render ? c.render(row) : String(row[c.key] ?? "—")}
                  </td>
                ))}
                <td className="px-2 py-1.5 text-right">
                  <button type="button" onClick={() => setEditing(editing === id ? null : id)} className="text-sm font-semibold text-clay-700 hover:underline">
                    {editing === id ? "Close" : "Edit"}
                  </button>
                </td>
              </tr>,
              editing === id ? (
                <tr key={`${id}-edit`}>
                  <td colSpan={columns.length + 1} className="py-2">
                    <RecordForm title={`Edit ${String(row.name ?? row.code ?? noun)}`} fields={fields} initial={toForm(row)} endpoint={`${endpoint}/${id}`} method="PATCH" version={Number(row.version)} submitLabel="Save" onDone={() => setEditing(null)} />
                  </td>
                </tr>
              ) : null,
            ];
          })}
        </tbody>
      </table></ScrollRegion>
      {rows.length === 0 ? <p className="py-4 text-sm text-soot-500">None yet.</p> : null}
    </section>
  );
}
