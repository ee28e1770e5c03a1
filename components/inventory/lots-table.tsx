import Link from "next/link";
import type { LotRow } from "@/lib/inventory/types";
import { kg, STATE_CLASS, STATE_LABEL } from "./format";

export type LotsTableProps = { lots: LotRow[]; today: string };

export function LotsTable({ lots, today }: LotsTableProps) {
  return (
    <section aria-labelledby="lots-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="lots-heading" className="font-display text-lg font-semibold">Lots</h2>
      <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Feedstock lots, scrolls sideways">
        <table className="w-full min-w-[720px] text-sm">
          <thead>
            <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-600">
              <th className="px-2 py-2">Lot</th>
              <th className="px-2 py-2">Material</th>
              <th className="px-2 py-2">Supplier and lot</th>
              <th className="px-2 py-2">State</th>
              <th className="px-2 py-2 text-right">Left of received</th>
              <th className="px-2 py-2">Use by</th>
              <th className="px-2 py-2 text-right">Builds</th>
            </tr>
          </thead>
          <tbody>
            {lots.map((l) => {
              const expired = l.expires_on !== null && l.expires_on < today;
              return (
                <tr key={l.id} className="border-b border-soot-100">
                  <td className="px-2 py-2">
                    <Link href={`/inventory/${l.id}`} className="inline-block min-h-11 py-2 font-mono font-semibold text-clay-800 underline-offset-2 hover:underline">{l.code}</Link>
                  </td>
                  <td className="px-2 py-2">{l.material_code}</td>
                  <td className="px-2 py-2">{l.supplier} <span className="text-soot-600">{l.supplier_lot}</span>{l.form ? <span className="block text-xs text-soot-600">{l.form}</span> : null}</td>
                  <td className="px-2 py-2">
                    <span className={`rounded px-2 py-0.5 text-xs font-semibold ${STATE_CLASS[l.state]}`}>{STATE_LABEL[l.state]}</span>
                    {l.recalled_at ? <span className="ml-1 rounded bg-oxide-100 px-2 py-0.5 text-xs font-semibold text-oxide-700">Recalled</span> : null}
                  </td>
                  <td className="px-2 py-2 text-right tabular-nums">{kg(l.remaining_g)} <span className="text-soot-600">of {kg(l.quantity_g)}</span></td>
                  <td className={`px-2 py-2 ${expired ? "font-semibold text-oxide-700" : ""}`}>{l.expires_on ? `${l.expires_on}${expired ? " (expired)" : ""}` : "—"}</td>
                  <td className="px-2 py-2 text-right tabular-nums">{l.builds}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
        {lots.length === 0 ? <p className="py-4 text-sm text-soot-600">No lots received yet.</p> : null}
      </div>
    </section>
  );
}
