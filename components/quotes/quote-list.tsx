"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useCallback, useEffect, useState } from "react";
import { getJson, sendJson, ApiError } from "@/lib/http/client";
import { formatMoney } from "@/lib/quotes/money";

type Row = {
  id: string; code: string; customer: string; contact_email: string; status: string; valid_until: string; currency: string; minor_digits: number;
  total_minor: number | null; promise_at: string | null; order_code: string | null; line_count: number;
};

export type QuoteListProps = { canWrite: boolean };

const day = (iso: string | null) => (iso ? new Date(iso).toISOString().slice(0, 10) : "—");

export function QuoteList({ canWrite }: QuoteListProps) {
  const router = useRouter();
  const [rows, setRows] = useState<Row[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const [busy, setBusy] = useState(false);

  const load = useCallback(() => {
    getJson<{ quotes: Row[] }>("/api/quotes").then((d) => setRows(d.quotes), (e) => setError(e.message));
  }, []);
  useEffect(load, [load]);

  async function create(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setBusy(true);
    setError(null);
    setFieldErrors({});
    const form = new FormData(e.currentTarget);
    try {
      const { quote } = await sendJson<{ quote: { id: string } }>("/api/quotes", "POST", Object.fromEntries(form));
      router.push(`/quotes/${quote.id}`);
    } catch (err) {
      if (err instanceof ApiError) setFieldErrors(err.fieldErrors ?? {});
      setError(err instanceof Error ? err.message : String(err));
      setBusy(false);
    }
  }

  return (
    <div className="space-y-6 px-4 py-6 sm:px-8">
      {canWrite ? (
        <form onSubmit={create} className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="new-quote" data-testid="new-quote">
          <h2 id="new-quote" className="font-display text-base font-semibold text-soot-900">New quote</h2>
          <div className="mt-3 grid grid-cols-1 gap-3 sm:grid-cols-3">
            <label className="block text-sm">
              <span className="block text-2xs text-soot-500">Customer</span>
              <input name="customer" required maxLength={200} className="w-full rounded-md border border-soot-300 px-2 py-2" aria-invalid={!!fieldErrors.customer} />
              {fieldErrors.customer ? <span className="text-xs text-oxide-700">{fieldErrors.customer[0]}</span> : null}
            </label>
            <label className="block text-sm">
              <span className="block text-2xs text-soot-500">Contact e-mail</span>
              <input name="contact_email" type="email" required className="w-full rounded-md border border-soot-300 px-2 py-2" aria-invalid={!!fieldErrors.contact_email} />
              {fieldErrors.contact_email ? <span className="text-xs text-oxide-700">{fieldErrors.contact_email[0]}</span> : null}
            </label>
            <div className="flex items-end">
              <button type="submit" disabled={busy} className="min-h-11 rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">Start quote</button>
            </div>
          </div>
        </form>
      ) : null}
      {error ? <p role="alert" className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700">{error}</p> : null}
      <div className="overflow-x-auto rounded-card border border-soot-200 bg-white shadow-card" tabIndex={0} role="region" aria-label="Quotes table (scrolls sideways)">
        <table className="w-full text-sm" data-testid="quote-table">
          <caption className="sr-only">Quotes</caption>
          <thead className="bg-soot-50 text-left text-xs text-soot-600">
            <tr>
              <th scope="col" className="px-3 py-2">Quote</th>
              <th scope="col" className="px-3 py-2">Customer</th>
              <th scope="col" className="px-3 py-2">Status</th>
              <th scope="col" className="px-3 py-2 text-right">Total</th>
              <th scope="col" className="px-3 py-2">Promise</th>
              <th scope="col" className="px-3 py-2">Valid until</th>
              <th scope="col" className="px-3 py-2">Order</th>
            </tr>
          </thead>
          <tbody>
            {rows === null ? (
              <tr><td colSpan={7} className="px-3 py-4 text-soot-500">Loading…</td></tr>
            ) : rows.length === 0 ? (
              <tr><td colSpan={7} className="px-3 py-4 text-soot-500">No quotes yet.</td></tr>
            ) : (
              rows.map((r) => (
                <tr key={r.id} className="border-t border-soot-100">
                  <td className="px-3 py-2"><Link href={`/quotes/${r.id}`} className="tap-target inline-flex items-center font-semibold text-clay-800 hover:underline">{r.code}</Link></td>
                  <td className="px-3 py-2">{r.customer}</td>
                  <td className="px-3 py-2" data-status={r.status}>{r.status}</td>
                  <td className="tabular px-3 py-2 text-right">{r.total_minor === null ? "—" : formatMoney(r.total_minor, r.currency, r.minor_digits)}</td>
                  <td className="tabular px-3 py-2">{day(r.promise_at)}</td>
                  <td className="tabular px-3 py-2">{day(r.valid_until)}</td>
                  <td className="px-3 py-2">{r.order_code ?? "—"}</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </div>
  );
}
