"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiError, sendJson } from "@/lib/http/client";
import { field, primary, secondary } from "./format";

export type ReceiveFormProps = { materials: { id: string; code: string; name: string }[]; forms: { id: string; name: string }[]; today: string };

/** Receive one lot by hand, or many from a CSV; both land in quarantine. */
export function ReceiveForm({ materials, forms, today }: ReceiveFormProps) {
  const router = useRouter();
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function receive(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const body = Object.fromEntries([...f.entries()].map(([k, v]) => [k, v === "" && (k === "expires_on" || k === "form_id") ? null : v]));
    setBusy(true);
    setErrors({});
    try {
      const { lot } = await sendJson<{ lot: { id: string; code: string } }>("/api/inventory/lots", "POST", body);
      setMessage(`Received as ${lot.code}, in quarantine until released.`);
      (e.target as HTMLFormElement).reset();
      router.refresh();
    } catch (err) {
      setMessage(err instanceof Error ? err.message : String(err));
      if (err instanceof ApiError && err.fieldErrors) setErrors(err.fieldErrors);
    } finally {
      setBusy(false);
    }
  }

  async function importCsv(e: React.ChangeEvent<HTMLInputElement>) {
    const file = e.target.files?.[0];
    if (!file) return;
    setBusy(true);
    try {
      const res = await fetch("/api/inventory/lots/import", { method: "POST", headers: { "content-type": "text/csv" }, body: await file.text() });
      const body = await res.json();
      if (!res.ok) {
        const fe = body.error?.fieldErrors ? Object.entries(body.error.fieldErrors as Record<string, string[]>).map(([k, v]) => `${k}: ${v.join(", ")}`).join("; ") : "";
        setMessage(`${body.error?.message ?? "The import failed."} ${fe}`);
      } else {
        setMessage(`Received ${body.lots.length} lots into quarantine: ${body.lots.map((l: { code: string }) => l.code).join(", ")}.`);
        router.refresh();
      }
    } finally {
      setBusy(false);
      e.target.value = "";
    }
  }

  const err = (k: string) => (errors[k]?.length ? <span className="mt-1 block text-xs text-oxide-700">{errors[k].join(", ")}</span> : null);
  return (
    <section aria-labelledby="receive-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="receive-heading" className="font-display text-lg font-semibold">Receive feedstock</h2>
      <form onSubmit={receive} className="mt-3 grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4" noValidate>
        <label className="text-sm">
          Material
          <select name="material_id" required className={field} defaultValue="">
            <option value="" disabled>Choose…</option>
            {materials.map((m) => (
              <option key={m.id} value={m.id}>{m.code} — {m.name}</option>
            ))}
          </select>
          {err("material_id")}
        </label>
        <label className="text-sm">
          Supplier
          <input name="supplier" required maxLength={120} className={field} autoComplete="organization" />
          {err("supplier")}
        </label>
        <label className="text-sm">
          Supplier&apos;s lot number
          <input name="supplier_lot" required maxLength={80} className={field} />
          {err("supplier_lot")}
        </label>
        <label className="text-sm">
          Form and container
          <select name="form_id" className={field} defaultValue="">
            <option value="">Not given</option>
            {forms.map((f) => (
              <option key={f.id} value={f.id}>{f.name}</option>
            ))}
          </select>
          {err("form_id")}
        </label>
        <label className="text-sm">
          Received on
          <input name="received_on" type="date" required defaultValue={today} className={field} />
          {err("received_on")}
        </label>
        <label className="text-sm">
          Use by (shelf life)
          <input name="expires_on" type="date" className={field} />
          {err("expires_on")}
        </label>
        <label className="text-sm">
          Quantity (kg)
          <input name="quantity_kg" type="number" inputMode="decimal" step="0.1" min="0.1" required className={field} />
          {err("quantity_kg")}
        </label>
        <label className="text-sm">
          Storage notes
          <input name="storage_notes" maxLength={500} className={field} placeholder="e.g. dry cabinet 1" />
          {err("storage_notes")}
        </label>
        <div className="flex flex-wrap items-center gap-3 sm:col-span-2 lg:col-span-4">
          <button type="submit" className={primary} disabled={busy}>Receive into quarantine</button>
          <label className={`${secondary} inline-flex cursor-pointer items-center`}>
            Import a CSV…
            <input type="file" accept=".csv,text/csv" className="sr-only" onChange={importCsv} disabled={busy} />
          </label>
          <span className="text-xs text-soot-600">CSV columns: material, supplier, supplier_lot, form, received_on, expires_on, quantity_kg, storage_notes</span>
        </div>
      </form>
      <p role="status" aria-live="polite" className="mt-2 text-sm text-soot-700">{message}</p>
    </section>
  );
}
