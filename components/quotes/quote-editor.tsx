"use client";

import Link from "next/link";
import { useCallback, useEffect, useState } from "react";
import { GeometryUpload } from "@/components/parts/geometry-upload";
import { ApiError, getJson, sendJson } from "@/lib/http/client";
import { formatMoney } from "@/lib/quotes/money";
import type { EvaluatedQuote } from "@/lib/quotes/evaluate";
import { CostTable } from "./cost-table";

type Quote = {
  id: string; code: string; customer: string; contact_email: string; status: string; valid_until: string; currency: string; minor_digits: number;
  total_minor: number | null; promise_at: string | null; promise_p90_at: string | null; order_id: string | null; order_code: string | null; plan_proposal_id: string | null; version: number; notes: string;
};
type Line = { id: string; name: string; quantity: number; material_code: string; filename: string | null; part_number: string | null; requested_at: string | null };
type Detail = { quote: Quote; lines: Line[]; evaluated: EvaluatedQuote | null; time_zone: string };
type Material = { id: string; code: string; name: string };
type PartOption = { id: string; part_number: string; revision: string; name: string; order_code: string };

export type QuoteEditorProps = { id: string; canWrite: boolean; maxUploadBytes: number };

function when(iso: string | null | undefined, tz: string) {
  if (!iso) return "—";
  return new Intl.DateTimeFormat("en-GB", { timeZone: tz, dateStyle: "medium", timeStyle: "short" }).format(new Date(iso));
}

const input = "w-full rounded-md border border-soot-300 px-2 py-2 text-sm";
const button = "min-h-11 rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60";
const quiet = "min-h-11 rounded-md border border-soot-300 bg-white px-4 py-2 text-sm font-semibold text-soot-800 hover:bg-soot-50 disabled:opacity-60";

export function QuoteEditor({ id, canWrite, maxUploadBytes }: QuoteEditorProps) {
  const [detail, setDetail] = useState<Detail | null>(null);
  const [materials, setMaterials] = useState<Material[]>([]);
  const [parts, setParts] = useState<PartOption[]>([]);
  const [error, setError] = useState<string | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const [busy, setBusy] = useState(false);
  const [source, setSource] = useState<"stl" | "part">("stl");
  const [fileId, setFileId] = useState<string | null>(null);
  const [analysed, setAnalysed] = useState(false);
  const [accepted, setAccepted] = useState<{ order_id: string; plan_proposal_id: string | null } | null>(null);
  const [capable, setCapable] = useState<{ by: string; lines: { name: string; quantity: number; completion: string | null }[] } | null>(null);

  const load = useCallback(() => {
    getJson<Detail>(`/api/quotes/${id}`).then(setDetail, (e) => setError(e.message));
  }, [id]);
  useEffect(load, [load]);
  useEffect(() => {
    getJson<{ materials: Material[] }>("/api/quote-settings").then((d) => setMaterials(d.materials), () => {});
    getJson<{ rows: PartOption[] }>("/api/parts?page_size=200").then((d) => setParts(d.rows), () => {});
  }, []);

  async function act(fn: () => Promise<unknown>) {
    setBusy(true);
    setError(null);
    setFieldErrors({});
    try {
      await fn();
      load();
      return true;
    } catch (err) {
      if (err instanceof ApiError) setFieldErrors(err.fieldErrors ?? {});
      setError(err instanceof Error ? err.message : String(err));
      if (err instanceof ApiError && err.status === 409) load();
      return false;
    } finally {
      setBusy(false);
    }
  }

  if (!detail) return <div className="px-8 py-6 text-sm text-soot-500">{error ?? "Loading…"}</div>;
  const { quote: q, lines, evaluated: ev, time_zone: tz } = detail;
  const money = (minor: number) => formatMoney(minor, q.currency, q.minor_digits);
  const draft = q.status === "draft";

  async function addLine(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const form = e.currentTarget;
    const body: Record<string, unknown> = Object.fromEntries(new FormData(form));
    for (const k of Object.keys(body)) if (body[k] === "") delete body[k];
    body.version = q.version;
    if (source === "stl") {
      delete body.part_id;
      body.file_id = fileId ?? undefined;
    } else {
      delete body.material_id;
    }
    const ok = await act(() => sendJson(`/api/quotes/${id}/lines`, "POST", body));
    if (ok) {
      form.reset();
      setFileId(null);
      setAnalysed(false);
    }
  }

  const fe = (k: string) => (fieldErrors[k] ? <span className="text-xs text-oxide-700">{fieldErrors[k][0]}</span> : null);

  return (
    <div className="space-y-6 px-4 py-6 sm:px-8" data-testid="quote-editor" data-status={q.status}>
      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
        <div className="flex flex-wrap items-start justify-between gap-3">
          <div>
            <h2 className="font-display text-lg font-semibold text-soot-900">{q.code} · {q.customer}</h2>
            <p className="text-sm text-soot-600">{q.contact_email} · valid until {when(q.valid_until, tz)} · <span data-testid="quote-status">{q.status}</span></p>
          </div>
          <div className="flex flex-wrap gap-2">
            {q.status !== "draft" && q.total_minor !== null ? <a className={quiet} href={`/api/quotes/${id}/pdf`} target="_blank" rel="noreferrer">PDF</a> : null}
            {canWrite && draft ? <button type="button" className={button} disabled={busy || !lines.length} onClick={() => act(() => sendJson(`/api/quotes/${id}/actions`, "POST", { action: "send", version: q.version }))}>Send to customer</button> : null}
            {canWrite && q.status === "sent" ? (
              <>
                <button type="button" className={button} disabled={busy} onClick={() => act(async () => setAccepted(await sendJson(`/api/quotes/${id}/actions`, "POST", { action: "accept", version: q.version })))}>Customer accepted</button>
                <button type="button" className={quiet} disabled={busy} onClick={() => act(() => sendJson(`/api/quotes/${id}/actions`, "POST", { action: "decline", version: q.version }))}>Declined</button>
              </>
            ) : null}
          </div>
        </div>
        {q.order_id ? (
          <p className="mt-3 rounded-md bg-verdigris-50 px-3 py-2 text-sm text-verdigris-800" data-testid="quote-order">
            Order <Link className="font-semibold underline" href={`/parts?order_id=${q.order_id}`}>{q.order_code}</Link> is due {when(q.promise_at, tz)}.
            {(accepted?.plan_proposal_id ?? q.plan_proposal_id) ? <> Its builds wait as a plan proposal: apply it on the <Link className="font-semibold underline" href="/floor">floor</Link> (nothing is booked until then).</> : null}
          </p>
        ) : null}
        {error ? <p role="alert" className="mt-3 rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700" data-testid="quote-error">{error}</p> : null}
      </section>

      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="summary-h">
        <h2 id="summary-h" className="font-display text-base font-semibold text-soot-900">Price and promise {draft ? "(as the schedule stands now)" : "(as sent)"}</h2>
        {ev ? (
          <dl className="mt-2 grid grid-cols-1 gap-2 text-sm sm:grid-cols-3">
            <div><dt className="text-2xs text-soot-500">Total</dt><dd className="tabular text-lg font-semibold" data-testid="quote-total">{ev.total_minor === null ? "cannot be planned" : money(ev.total_minor)}</dd></div>
            <div><dt className="text-2xs text-soot-500">Earliest completion</dt><dd className="tabular font-semibold" data-testid="quote-promise">{when(ev.completion, tz)}</dd></div>
            <div><dt className="text-2xs text-soot-500">9 in 10 chance by (P90)</dt><dd className="tabular font-semibold">{when(ev.p90, tz)}</dd></div>
            <div><dt className="text-2xs text-soot-500">Set-up (once per order)</dt><dd className="tabular">{money(ev.setup_minor)}</dd></div>
          </dl>
        ) : <p className="text-sm text-soot-500">Add a line to see the price and date.</p>}
      </section>

      {ev?.lines.map((l) => {
        const line = lines.find((x) => x.id === l.line_id);
        return (
          <section key={l.line_id} className="rounded-card border border-soot-200 bg-white p-4 shadow-card" data-testid="quote-line">
            <div className="flex flex-wrap items-baseline justify-between gap-2">
              <h3 className="font-display text-base font-semibold text-soot-900">{l.name}</h3>
              <p className="text-sm text-soot-600">
                {l.quantity} × {line?.material_code} · start {l.quantity_to_start} (yield {(l.yield.estimate * 100).toFixed(1)} %, {l.yield.source === "measured" ? `${l.yield.good} of ${l.yield.good + l.yield.scrapped} recorded` : "fallback: no records"})
              </p>
              {canWrite && draft && line ? (
                <button type="button" className="text-sm text-oxide-700 underline" onClick={() => act(() => sendJson(`/api/quotes/${id}/lines/${line.id}`, "DELETE", { version: q.version }))}>Remove</button>
              ) : null}
            </div>
            <div className="mt-3 grid grid-cols-1 gap-4 lg:grid-cols-2">
              <div className="min-w-0">
                <h4 className="text-xs font-semibold text-soot-600">Cost</h4>
                {l.cost ? <CostTable figures={l.cost.figures} currency={q.currency} minorDigits={q.minor_digits} /> : <p className="text-sm text-soot-500">No cost: the line cannot be planned.</p>}
                {l.unit.volume_estimated ? <p className="mt-1 text-xs text-brass-700">No closed mesh volume: the green volume is taken as half the bounding box.</p> : null}
              </div>
              <div className="min-w-0">
                <h4 className="text-xs font-semibold text-soot-600">Plan (tentative, nothing booked)</h4>
                {l.promise.feasible ? (
                  <>
                    <p className="text-sm">Complete {when(l.promise.completion, tz)} · P90 {when(l.promise.p90, tz)}
                      {l.meets_requested === false ? <span className="ml-2 font-semibold text-oxide-700">after the requested date</span> : null}
                    </p>
                    <div className="overflow-x-auto" tabIndex={0} role="region" aria-label={`Promise steps of ${l.name}`}>
                      <table className="mt-2 w-full text-xs">
                        <caption className="sr-only">Steps of {l.name}</caption>
                        <thead className="text-left text-soot-500"><tr><th scope="col" className="py-1 pr-2">Step</th><th scope="col" className="py-1 pr-2">Start</th><th scope="col" className="py-1 pr-2">End</th><th scope="col" className="py-1 text-right">Slack</th></tr></thead>
                        <tbody>
                          {l.promise.steps.map((s, i) => (
                            <tr key={i} className={`border-t border-soot-100 ${s.critical ? "font-semibold" : ""}`} data-critical={s.critical}>
                              <td className="py-1 pr-2">{s.critical ? "● " : ""}{s.label}</td>
                              <td className="tabular py-1 pr-2">{when(s.start, tz)}</td>
                              <td className="tabular py-1 pr-2">{when(s.end, tz)}</td>
                              <td className="tabular py-1 text-right">{Math.round(s.slack_min / 60)} h</td>
                            </tr>
                          ))}
                        </tbody>
                      </table>
                    </div>
                    <p className="mt-1 break-words text-2xs text-soot-500">● critical path. P90 from actual ÷ planned durations: {(["print", "wash", "furnace", "finishing"] as const).map((k) => `${k} ×${l.promise.feasible ? l.promise.p90_basis[k].p90_ratio.toFixed(2) : "?"} (${l.promise.feasible && l.promise.p90_basis[k].source === "history" ? `${l.promise.p90_basis[k].samples} records` : "fallback, no history"})`).join(", ")}.</p>
                  </>
                ) : (
                  <p className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700" data-testid="line-infeasible">{l.promise.reason}</p>
                )}
              </div>
            </div>
          </section>
        );
      })}

      {canWrite && draft ? (
        <form onSubmit={addLine} className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="add-line-h" data-testid="add-line">
          <h2 id="add-line-h" className="font-display text-base font-semibold text-soot-900">Add a line</h2>
          <fieldset className="mt-2 flex gap-4 text-sm">
            <legend className="sr-only">Part from</legend>
            <label className="flex min-h-11 items-center gap-2"><input type="radio" name="source" checked={source === "stl"} onChange={() => setSource("stl")} /> Customer&apos;s STL</label>
            <label className="flex min-h-11 items-center gap-2"><input type="radio" name="source" checked={source === "part"} onChange={() => setSource("part")} /> Existing part</label>
          </fieldset>
          {source === "stl" ? (
            <div className="mt-2">
              <GeometryUpload uploadUrl="/api/quotes/geometry" maxBytes={maxUploadBytes} current={null} onFile={(fid) => { setFileId(fid); setAnalysed(false); }} onAnalysed={() => setAnalysed(true)} />
              {fe("file_id")}
            </div>
          ) : (
            <label className="mt-2 block text-sm">
              <span className="block text-2xs text-soot-500">Part</span>
              <select name="part_id" className={input} defaultValue="">
                <option value="" disabled>Choose a part</option>
                {parts.map((p) => <option key={p.id} value={p.id}>{p.part_number} rev {p.revision} · {p.name} ({p.order_code})</option>)}
              </select>
              {fe("part_id")}
            </label>
          )}
          <div className="mt-3 grid grid-cols-2 gap-3 sm:grid-cols-4">
            <label className="col-span-2 block text-sm"><span className="block text-2xs text-soot-500">Name (optional)</span><input name="name" maxLength={200} className={input} /></label>
            {source === "stl" ? (
              <label className="col-span-2 block text-sm">
                <span className="block text-2xs text-soot-500">Material</span>
                <select name="material_id" className={input} defaultValue="">
                  <option value="" disabled>Choose a material</option>
                  {materials.map((m) => <option key={m.id} value={m.id}>{m.code} · {m.name}</option>)}
                </select>
                {fe("material_id")}
              </label>
            ) : null}
            <label className="block text-sm"><span className="block text-2xs text-soot-500">Quantity</span><input name="quantity" inputMode="numeric" required defaultValue="10" className={input} />{fe("quantity")}</label>
            <label className="block text-sm"><span className="block text-2xs text-soot-500">Thickest wall, mm</span><input name="thickest_wall_mm" inputMode="decimal" className={input} />{fe("thickest_wall_mm")}</label>
            <label className="block text-sm"><span className="block text-2xs text-soot-500">Requested by</span><input name="requested_at" type="date" className={input} />{fe("requested_at")}</label>
            <label className="block text-sm"><span className="block text-2xs text-soot-500">Target Ra, µm</span><input name="target_ra_um" inputMode="decimal" className={input} />{fe("target_ra_um")}</label>
            <label className="block text-sm"><span className="block text-2xs text-soot-500">Tolerance, ± µm</span><input name="tolerance_um" inputMode="decimal" className={input} />{fe("tolerance_um")}</label>
            {(["x_neg", "x_pos", "y_neg", "y_pos", "z_neg", "z_pos"] as const).map((f) => (
              <label key={f} className="block text-sm"><span className="block text-2xs text-soot-500">Stock {f.replace("_", " ")}, mm</span><input name={`stock_${f}_mm`} inputMode="decimal" className={input} />{fe(`stock_${f}_mm`)}</label>
            ))}
          </div>
          <button type="submit" className={`${button} mt-3`} disabled={busy || (source === "stl" && (!fileId || !analysed))}>Add line</button>
        </form>
      ) : null}

      <form
        className="rounded-card border border-soot-200 bg-white p-4 shadow-card"
        aria-labelledby="capable-h"
        onSubmit={(e) => {
          e.preventDefault();
          const by = String(new FormData(e.currentTarget).get("by") ?? "");
          act(async () => setCapable(await getJson(`/api/quotes/${id}/capable?by=${encodeURIComponent(by)}`)));
        }}
      >
        <h2 id="capable-h" className="font-display text-base font-semibold text-soot-900">How many by a date?</h2>
        <div className="mt-2 flex flex-wrap items-end gap-3">
          <label className="block text-sm"><span className="block text-2xs text-soot-500">Date</span><input name="by" type="date" required className={input} /></label>
          <button type="submit" className={quiet} disabled={busy || !lines.length}>Check</button>
        </div>
        {capable ? (
          <ul className="mt-2 text-sm" data-testid="capable">
            {capable.lines.map((l) => <li key={l.name}>{l.name}: <strong>{l.quantity}</strong> good units{l.completion ? `, done ${when(l.completion, tz)}` : ""}</li>)}
          </ul>
        ) : null}
      </form>
    </div>
  );
}
