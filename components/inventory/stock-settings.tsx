"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, sendJson } from "@/lib/http/client";
import { field, kg, primary, secondary } from "./format";

export type StockRule = { id: string; code: string; name: string; version: number; support_allowance: number; purge_g: number; reorder_point_g: number; lead_time_days: number };
export type StockSettingsProps = { materials: StockRule[]; forms: { id: string; name: string }[]; canWrite: boolean };

const pct = (x: number) => Math.round(x * 1000) / 10;

/** Per material, the allowances on top of the parts' mass and the reorder rule; and the shop's list of forms and containers. */
export function StockSettings({ materials, forms, canWrite }: StockSettingsProps) {
  return (
    <section aria-labelledby="stock-settings-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="stock-settings-heading" className="font-display text-lg font-semibold">Stock rules and containers</h2>
      <p className="mt-1 text-sm text-soot-700">
        Supports and raft are a share of the parts&apos; green mass and purge a fixed mass per build: the shop&apos;s own figures (common practice, no published source). A
        reorder mail goes to managers once when the projection falls below the reorder point within the lead time.
      </p>
      <div className="mt-3 space-y-3">
        {materials.map((m) => (canWrite ? <RuleForm key={`${m.id}:${m.version}`} rule={m} /> : <RuleText key={m.id} rule={m} />))}
      </div>
      <FormsList forms={forms} canWrite={canWrite} />
    </section>
  );
}

function RuleText({ rule: m }: { rule: StockRule }) {
  return (
    <p className="text-sm">
      <span className="font-semibold">{m.code}</span> {m.name}: supports and raft {pct(m.support_allowance)} %, purge {m.purge_g} g, reorder at {kg(m.reorder_point_g)}, lead time {m.lead_time_days} days.
    </p>
  );
}

function RuleForm({ rule: m }: { rule: StockRule }) {
  const router = useRouter();
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function save(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const percent = Number(f.get("support_percent"));
    const body = {
      version: m.version,
      support_allowance: Number.isFinite(percent) ? Math.round(percent * 10) / 1000 : f.get("support_percent"),
      purge_g: f.get("purge_g"),
      reorder_point_kg: f.get("reorder_point_kg"),
      lead_time_days: f.get("lead_time_days"),
    };
    setBusy(true);
    setErrors({});
    try {
      await sendJson(`/api/inventory/materials/${m.id}`, "PATCH", body);
      setMessage(`${m.code} saved.`);
      router.refresh();
    } catch (err) {
      // The form keeps what was typed; a 409 says to reload for the other person's change.
      setMessage(err instanceof ApiError && err.status === 409 ? `${err.message} Your figures are kept here.` : err instanceof Error ? err.message : String(err));
      if (err instanceof ApiError && err.fieldErrors) setErrors(err.fieldErrors);
    } finally {
      setBusy(false);
    }
  }

  const err = (k: string) => (errors[k]?.length ? <span className="block text-xs text-oxide-700">{errors[k].join("; ")}</span> : null);
  return (
    <form onSubmit={save} aria-label={`Stock rules for ${m.code}`} className="grid grid-cols-2 items-end gap-2 border-t border-soot-100 pt-3 sm:grid-cols-3 lg:grid-cols-6">
      <div className="col-span-2 sm:col-span-3 lg:col-span-1">
        <div className="font-semibold">{m.code}</div>
        <div className="text-xs text-soot-700">{m.name}</div>
      </div>
      <label className="text-sm">
        Supports and raft (%)
        <input name="support_percent" type="number" inputMode="decimal" step="0.1" min="0" max="499" required defaultValue={pct(m.support_allowance)} className={field} />
        {err("support_allowance")}
      </label>
      <label className="text-sm">
        Purge per build (g)
        <input name="purge_g" type="number" inputMode="decimal" step="0.1" min="0" max="100000" required defaultValue={m.purge_g} className={field} />
        {err("purge_g")}
      </label>
      <label className="text-sm">
        Reorder point (kg)
        <input name="reorder_point_kg" type="number" inputMode="decimal" step="0.01" min="0" max="100000" required defaultValue={m.reorder_point_g / 1000} className={field} />
        {err("reorder_point_kg")}
      </label>
      <label className="text-sm">
        Lead time (days)
        <input name="lead_time_days" type="number" inputMode="numeric" step="1" min="0" max="365" required defaultValue={m.lead_time_days} className={field} />
        {err("lead_time_days")}
      </label>
      <div>
        <button type="submit" className={secondary} disabled={busy}>Save {m.code}</button>
        <p role="status" aria-live="polite" className="text-xs text-soot-800">{message}</p>
      </div>
    </form>
  );
}

function FormsList({ forms, canWrite }: { forms: { id: string; name: string }[]; canWrite: boolean }) {
  const router = useRouter();
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function add(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const name = String(new FormData(form).get("name") ?? "");
    setBusy(true);
    try {
      const r = await sendJson<{ form: { name: string } }>("/api/inventory/forms", "POST", { name });
      setMessage(`${r.form.name} is on the list.`);
      form.reset();
      router.refresh();
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
    } finally {
      setBusy(false);
    }
  }

  return (
    <div className="mt-5 border-t border-soot-200 pt-4">
      <h3 className="font-semibold">Forms and containers</h3>
      <ul aria-label="Forms and containers" className="mt-1 flex flex-wrap gap-2 text-sm">
        {forms.length ? forms.map((f) => <li key={f.id} className="rounded-full bg-soot-100 px-3 py-1">{f.name}</li>) : <li className="text-soot-700">None yet.</li>}
      </ul>
      {canWrite ? (
        <form onSubmit={add} className="mt-2 flex flex-wrap items-end gap-2">
          <label className="text-sm">
            Add a form or container (e.g. 1 kg spool, rod tube)
            <input name="name" required maxLength={60} autoComplete="off" className={field} />
          </label>
          <button type="submit" className={primary} disabled={busy}>Add to the list</button>
        </form>
      ) : null}
      <p role="status" aria-live="polite" className="mt-2 text-sm text-soot-800">{message}</p>
    </div>
  );
}
