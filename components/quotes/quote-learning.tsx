"use client";

import { useEffect, useState } from "react";
import { getJson } from "@/lib/http/client";
import { formatMoney } from "@/lib/quotes/money";

type Learning = {
  sent: number; accepted: number; declined: number; expired: number; win_rate: number | null;
  finished: { order_code: string; quote_code: string; promise_at: string; completed_at: string | null; late_minutes: number | null; quoted_total_minor: number; currency: string; minor_digits: number; units: number; done: number; scrapped: number;
    quoted_direct_minor: number | null; actual_direct_minor: number | null; actual_figures: { key: string; label: string; formula: string; minor: number }[] }[];
};

/** What quoting has taught: how many quotes went out and were won, and how the promises held. */
export function QuoteLearning() {
  const [data, setData] = useState<Learning | null>(null);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    getJson<Learning>("/api/quotes/learning").then(setData, (e) => setError(e.message));
  }, []);
  return (
    <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="quote-learning-h" data-testid="quote-learning">
      <h2 id="quote-learning-h" className="font-display text-base font-semibold text-soot-900">Quotes: promised and delivered</h2>
      {error ? <p role="alert" className="text-sm text-oxide-700">{error}</p> : null}
      {data ? (
        <>
          <dl className="mt-2 grid grid-cols-2 gap-2 text-sm sm:grid-cols-5">
            <div><dt className="text-2xs text-soot-500">Sent</dt><dd className="tabular font-semibold">{data.sent}</dd></div>
            <div><dt className="text-2xs text-soot-500">Accepted</dt><dd className="tabular font-semibold">{data.accepted}</dd></div>
            <div><dt className="text-2xs text-soot-500">Declined</dt><dd className="tabular font-semibold">{data.declined}</dd></div>
            <div><dt className="text-2xs text-soot-500">Expired</dt><dd className="tabular font-semibold">{data.expired}</dd></div>
            <div><dt className="text-2xs text-soot-500">Win rate</dt><dd className="tabular font-semibold" data-testid="win-rate">{data.win_rate === null ? "—" : `${Math.round(data.win_rate * 100)} %`}</dd></div>
          </dl>
          {data.finished.length ? (
            <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Finished orders from quotes">
              <table className="w-full text-xs">
                <caption className="sr-only">Finished orders from quotes</caption>
                <thead className="text-left text-soot-500"><tr><th scope="col" className="py-1 pr-2">Order</th><th scope="col" className="py-1 pr-2">Quoted</th><th scope="col" className="py-1 pr-2">Cost quoted / actual</th><th scope="col" className="py-1 pr-2">Good / started</th><th scope="col" className="py-1 pr-2">Promised</th><th scope="col" className="py-1 pr-2">Finished</th><th scope="col" className="py-1 text-right">Late by</th></tr></thead>
                <tbody>
                  {data.finished.map((f) => (
                    <tr key={f.order_code} className="border-t border-soot-100">
                      <td className="py-1 pr-2">{f.order_code} ({f.quote_code})</td>
                      <td className="tabular py-1 pr-2">{formatMoney(f.quoted_total_minor, f.currency, f.minor_digits)}</td>
                      <td className="tabular py-1 pr-2" data-testid="cost-vs-actual">
                        {f.quoted_direct_minor === null || f.actual_direct_minor === null ? "—" : (
                          <details>
                            <summary className="cursor-pointer">
                              {formatMoney(f.quoted_direct_minor, f.currency, f.minor_digits)} / {formatMoney(f.actual_direct_minor, f.currency, f.minor_digits)}
                              {f.quoted_direct_minor > 0 ? ` (${f.actual_direct_minor >= f.quoted_direct_minor ? "+" : "−"}${Math.abs(Math.round(((f.actual_direct_minor - f.quoted_direct_minor) / f.quoted_direct_minor) * 100))} %)` : ""}
                            </summary>
                            <ul className="mt-1 space-y-0.5 text-2xs text-soot-700">
                              {f.actual_figures.map((x) => <li key={x.key} title={x.formula}>{x.label}: {formatMoney(x.minor, f.currency, f.minor_digits)}</li>)}
                            </ul>
                          </details>
                        )}
                      </td>
                      <td className="tabular py-1 pr-2">{f.done} / {f.units}</td>
                      <td className="tabular py-1 pr-2">{f.promise_at.slice(0, 10)}</td>
                      <td className="tabular py-1 pr-2">{f.completed_at?.slice(0, 10) ?? "—"}</td>
                      <td className="tabular py-1 text-right">{f.late_minutes === null ? "—" : f.late_minutes > 0 ? `${Math.round(f.late_minutes / 60)} h` : "on time"}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-1 text-2xs text-soot-500">Cost is the direct cost, before overhead and margin: quoted, and actual from the recorded print hours, feedstock drawn, wash batches and furnace runs used (shared by units), finishing minutes and inspections, at today&apos;s rates. Good-of-started shows how the yield allowance held.</p>
            </div>
          ) : <p className="mt-2 text-xs text-soot-500">No order from a quote has finished yet.</p>}
        </>
      ) : null}
    </section>
  );
}
