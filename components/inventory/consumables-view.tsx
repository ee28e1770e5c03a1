"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { sendJson } from "@/lib/http/client";
import type { BathState, GasWarning } from "@/lib/inventory/consumables";
import { field, kg, secondary } from "./format";

export type ConsumablesViewProps = {
  baths: Array<BathState & { id: string; name: string; solvent: string; version: number; bath_changed_at: string }>;
  gas: { supplies: Array<{ gas: string; on_hand_l: number; counted_at: string; note: string; scheduled_l: number }>; warnings: GasWarning[] };
  canWrite: boolean;
  timeZone: string;
};

const litres = (l: number) => `${Math.round(l).toLocaleString("en-GB")} L`;

export function ConsumablesView({ baths, gas, canWrite, timeZone }: ConsumablesViewProps) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const when = (iso: string) => new Intl.DateTimeFormat("en-GB", { timeZone, dateStyle: "medium", timeStyle: "short" }).format(new Date(iso));

  async function changed(b: ConsumablesViewProps["baths"][number]) {
    try {
      await sendJson(`/api/inventory/baths/${b.id}`, "POST", { version: b.version, note: "" });
      setMessage(`Bath at ${b.name} recorded as changed.`);
      router.refresh();
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    }
  }

  async function count(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    try {
      await sendJson("/api/inventory/gas", "POST", { gas: f.get("gas"), on_hand_l: f.get("on_hand_l"), note: f.get("note") ?? "" });
      setMessage(`Count of ${f.get("gas")} recorded.`);
      router.refresh();
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    }
  }

  return (
    <section id="consumables" aria-labelledby="consumables-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="consumables-heading" className="font-display text-lg font-semibold">Solvent baths and process gas</h2>
      <div className="mt-3 grid gap-4 lg:grid-cols-2">
        <div>
          <h3 className="text-sm font-semibold text-soot-800">Solvent baths</h3>
          <ul className="mt-2 space-y-3">
            {baths.map((b) => (
              <li key={b.id} className="rounded-md border border-soot-200 p-3">
                <div className="flex flex-wrap items-baseline justify-between gap-2">
                  <span className="font-semibold">{b.name}</span>
                  <span className="text-xs text-soot-600">{b.solvent}, changed {when(b.bath_changed_at)}</span>
                </div>
                <div className="mt-2 h-3 w-full rounded bg-soot-100" role="meter" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(b.saturation * 100)} aria-label={`${b.name} binder load`}>
                  <div className={`h-3 rounded ${b.due ? "bg-oxide-500" : "bg-verdigris-500"}`} style={{ width: `${Math.min(100, b.saturation * 100)}%` }} />
                </div>
                <p className="mt-1 text-sm">
                  {kg(b.dissolved_g)} binder of {kg(b.limit_g)} ({Math.round(b.saturation * 100)} %)
                  {b.due ? <strong className="ml-2 text-oxide-700">Change-out due</strong> : null}
                  {b.unmeasured_units ? <span className="block text-xs text-soot-600">{b.unmeasured_units} washed units not weighed yet are not counted.</span> : null}
                </p>
                {canWrite ? (
                  <button type="button" className={`${secondary} mt-2`} onClick={() => changed(b)}>
                    Record bath changed
                  </button>
                ) : null}
              </li>
            ))}
          </ul>
          <p className="mt-2 text-xs text-soot-600">Binder taken up = measured mass loss of the units washed since the last change; the limit per station is the shop&apos;s own figure (common practice, no published source).</p>
        </div>
        <div>
          <h3 className="text-sm font-semibold text-soot-800">Process gas</h3>
          <div className="mt-2 overflow-x-auto" tabIndex={0} role="region" aria-label="Process gas on hand">
            <table className="w-full min-w-[420px] text-sm">
              <thead>
                <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-600">
                  <th className="px-2 py-2">Gas</th>
                  <th className="px-2 py-2 text-right">On hand</th>
                  <th className="px-2 py-2 text-right">Scheduled runs use</th>
                  <th className="px-2 py-2">Counted</th>
                </tr>
              </thead>
              <tbody>
                {gas.supplies.map((s) => (
                  <tr key={s.gas} className="border-b border-soot-100">
                    <td className="px-2 py-2">{s.gas}</td>
                    <td className="px-2 py-2 text-right tabular-nums">{litres(s.on_hand_l)}</td>
                    <td className={`px-2 py-2 text-right tabular-nums ${s.scheduled_l > s.on_hand_l ? "font-semibold text-oxide-700" : ""}`}>{litres(s.scheduled_l)}</td>
                    <td className="px-2 py-2 text-xs text-soot-600">{when(s.counted_at)}{s.note ? ` — ${s.note}` : ""}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {gas.warnings.length ? (
            <ul className="mt-2 space-y-1 text-sm text-oxide-700" aria-label="Runs the gas on hand cannot cover">
              {gas.warnings.map((w) => (
                <li key={w.run_id}>
                  <strong>{w.code}</strong> needs {litres(w.needed_l)} of {w.gas}; {litres(Math.max(0, w.left_before_l))} left after the runs before it.
                </li>
              ))}
            </ul>
          ) : (
            <p className="mt-2 text-sm text-soot-700">Every scheduled run is covered by the gas counted.</p>
          )}
          <p className="mt-2 text-xs text-soot-600">Use per run = the profile&apos;s flow × its cycle time: an estimate, not a meter reading.</p>
          {canWrite ? (
            <form onSubmit={count} className="mt-3 grid grid-cols-1 gap-2 sm:grid-cols-3">
              <label className="text-sm">
                Gas
                <input name="gas" required list="gas-names" className={field} />
                <datalist id="gas-names">{gas.supplies.map((s) => <option key={s.gas} value={s.gas} />)}</datalist>
              </label>
              <label className="text-sm">
                On hand (L)
                <input name="on_hand_l" type="number" inputMode="decimal" min="0" step="1" required className={field} />
              </label>
              <label className="text-sm">
                Note
                <input name="note" className={field} placeholder="e.g. 5 cylinders" />
              </label>
              <button type="submit" className={`${secondary} sm:col-span-3 sm:justify-self-start`}>Record count</button>
            </form>
          ) : null}
        </div>
      </div>
      <p role="status" aria-live="polite" className="mt-2 text-sm text-soot-700">{message}</p>
    </section>
  );
}
