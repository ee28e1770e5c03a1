"use client";

import Link from "next/link";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useState } from "react";
import { ApiError, apiJson } from "@/components/floor/api";
import { formatDay, formatSlot, formatWhen, minutesLabel } from "@/components/floor/format";
import { ScrollRegion } from "@/components/ui/scroll-region";
import { NextStepCard } from "@/components/scan/next-step-card";
import type { Role } from "@/lib/auth/permissions";
import { buildNextStep } from "@/lib/scan/next-step";
import { PlateDrawing, type PlateDrawingProps } from "./plate-drawing";

type Detail = {
  build: {
    id: string; code: string; state: string; version: number; printer_id: string | null; printer_name: string | null; material_code: string; material_name: string;
    material_lot: string; starts_at: string | null; ends_at: string | null; started_at: string | null; finished_at: string | null; est_minutes: number | null;
    failed: boolean; failure_reason: string | null; notes: string;
  };
  units: { id: string; serial: string; state: string; part_id: string; part_number: string; revision: string; part_name: string; order_code: string; due_at: string; green_x_mm: number | null; green_y_mm: number | null; green_z_mm: number | null }[];
  verdicts: { printer_id: string; printer_name: string; ok: boolean; reason: string | null; est_minutes: number | null }[];
  layout: PlateDrawingProps["layout"] | null;
  layout_printer: string | null;
  history: { id: number; kind: string; from_state: string | null; to_state: string | null; reason: string | null; created_at: string; actor_name: string | null }[];
};

/** timeZone: the shop's, so the booking reads as it does on the floor. */
export type BuildViewProps = { buildId: string; canWrite: boolean; timeZone: string; role: Role };

const STATE_WORDS: Record<string, string> = { draft: "draft: not on the floor", scheduled: "booked on a printer", running: "printing", complete: "complete", cancelled: "cancelled" };

export function BuildView({ buildId, canWrite, timeZone, role }: BuildViewProps) {
  const qc = useQueryClient();
  const q = useQuery({ queryKey: ["build", buildId], queryFn: ({ signal }) => apiJson<Detail>(`/api/builds/${buildId}`, { signal }), refetchInterval: 15_000 });
  const [message, setMessage] = useState<{ tone: "success" | "danger"; text: string } | null>(null);
  const [failReason, setFailReason] = useState("");
  const [askFail, setAskFail] = useState(false);
  const [lot, setLot] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  if (q.isLoading) return <p className="px-4 md:px-8 py-6 text-sm text-soot-500">Loading…</p>;
  if (q.isError || !q.data) return <p role="alert" className="px-4 md:px-8 py-6 text-sm text-oxide-700">{(q.error as Error)?.message}</p>;
  const { build, units, verdicts, layout, history } = q.data;

  async function act(body: Record<string, unknown>, done: string) {
    setBusy(true);
    setMessage(null);
    try {
      await apiJson(`/api/builds/${buildId}/actions`, { method: "POST", body: { ...body, version: build.version } });
      setMessage({ tone: "success", text: done });
      setAskFail(false);
      setFailReason("");
    } catch (err) {
      const e = err as ApiError;
      setMessage({ tone: "danger", text: e.fieldErrors?.reason?.[0] ? `${e.message}` : e.message });
    } finally {
      setBusy(false);
      await qc.invalidateQueries({ queryKey: ["build", buildId] });
    }
  }

  async function saveLot() {
    if (lot === null) return;
    setBusy(true);
    try {
      await apiJson(`/api/builds/${buildId}`, { method: "PATCH", body: { version: build.version, material_lot: lot } });
      setMessage({ tone: "success", text: `Material lot ${lot || "(none)"} recorded.` });
      setLot(null);
    } catch (err) {
      setMessage({ tone: "danger", text: (err as Error).message });
    } finally {
      setBusy(false);
      await qc.invalidateQueries({ queryKey: ["build", buildId] });
    }
  }

  const button = "rounded-md px-3 py-1.5 text-sm font-semibold disabled:opacity-50";
  return (
    <div className="grid grid-cols-1 gap-5 px-4 md:px-8 py-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]" data-testid="build-view" data-state={build.state}>
      <section className="space-y-4">
        <NextStepCard
          title={build.code}
          subtitle={`${build.material_code} · ${units.length} unit${units.length === 1 ? "" : "s"}`}
          step={buildNextStep(role, build, units)}
          onDone={() => void qc.invalidateQueries({ queryKey: ["build", buildId] })}
        />
        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <div className="flex flex-wrap items-start justify-between gap-3">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-soot-500">State</dt>
              <dd className="font-semibold" data-testid="build-state">{build.failed ? `failed: ${build.failure_reason}` : (STATE_WORDS[build.state] ?? build.state)}</dd>
              <dt className="text-soot-500">Material</dt>
              <dd>{build.material_code} · {build.material_name}</dd>
              <dt className="text-soot-500">Material lot</dt>
              <dd>
                {canWrite ? (
                  <span className="flex items-center gap-2">
                    <input aria-label="Material lot" value={lot ?? build.material_lot} onChange={(e) => setLot(e.target.value)} className="w-40 rounded border border-soot-200 px-2 py-0.5 text-sm" />
                    {lot !== null && lot !== build.material_lot ? <button type="button" onClick={saveLot} disabled={busy} className="text-xs font-semibold text-clay-700 underline">Save</button> : null}
                  </span>
                ) : (
                  build.material_lot || "not recorded"
                )}
              </dd>
              <dt className="text-soot-500">Printer</dt>
              <dd>{build.printer_name ?? <span className="text-soot-500">not booked · <Link href="/floor" className="text-clay-700 underline">book it on the floor</Link></span>}</dd>
              <dt className="text-soot-500">Slot</dt>
              <dd className="tabular">{build.starts_at && build.ends_at ? formatSlot(build.starts_at, build.ends_at, timeZone) : "–"}</dd>
              <dt className="text-soot-500">Estimated print time</dt>
              <dd className="tabular" data-testid="build-estimate">
                {build.est_minutes ? minutesLabel(build.est_minutes) : verdicts.some((v) => v.ok) ? `${minutesLabel(Math.min(...verdicts.filter((v) => v.ok).map((v) => v.est_minutes!)))} on the fastest printer` : "no printer can take it"}
              </dd>
              {build.started_at ? (<><dt className="text-soot-500">Started</dt><dd className="tabular">{formatWhen(build.started_at, timeZone)}</dd></>) : null}
              {build.finished_at ? (<><dt className="text-soot-500">Finished</dt><dd className="tabular">{formatWhen(build.finished_at, timeZone)}</dd></>) : null}
            </dl>
            <div className="flex flex-col items-end gap-2">
              <div className="flex flex-wrap justify-end gap-2">
                <a href={`/api/builds/${buildId}/traveler`} target="_blank" rel="noreferrer" className={`${button} tap-target inline-flex items-center border border-soot-300 text-soot-800 hover:bg-soot-100`} data-testid="traveler-link">
                  Print traveler (PDF)
                </a>
                <a href={`/api/builds/${buildId}/labels`} target="_blank" rel="noreferrer" className={`${button} tap-target inline-flex items-center border border-soot-300 text-soot-800 hover:bg-soot-100`} data-testid="unit-labels-link">
                  Unit labels (PDF)
                </a>
              </div>
              {canWrite ? (
                <div className="flex flex-wrap justify-end gap-2">
                  {build.state === "scheduled" ? <button type="button" disabled={busy} onClick={() => act({ action: "start" }, `${build.code} started: its units are printing.`)} className={`${button} bg-clay-600 text-white hover:bg-clay-700`}>Start build</button> : null}
                  {build.state === "running" ? <button type="button" disabled={busy} onClick={() => act({ action: "complete" }, `${build.code} complete: its units are green.`)} className={`${button} bg-verdigris-500 text-white hover:bg-verdigris-700`}>Complete</button> : null}
                  {build.state === "running" || build.state === "scheduled" ? <button type="button" disabled={busy} onClick={() => setAskFail((v) => !v)} className={`${button} border border-oxide-500 text-oxide-700 hover:bg-oxide-100`}>Mark failed…</button> : null}
                  {build.state === "draft" || build.state === "scheduled" ? <button type="button" disabled={busy} onClick={() => act({ action: "cancel" }, `${build.code} cancelled; its units are free for another build.`)} className={`${button} border border-soot-300 text-soot-700 hover:bg-soot-100`}>Cancel build</button> : null}
                </div>
              ) : null}
            </div>
          </div>
          {askFail ? (
            <form className="mt-3 flex flex-wrap items-end gap-2 rounded-md bg-oxide-100/60 p-3" onSubmit={(e) => { e.preventDefault(); void act({ action: "fail", reason: failReason }, `${build.code} marked failed; its units are scrapped and replacement units are planned.`); }}>
              <label className="flex-1 text-xs font-medium text-oxide-700">
                What went wrong?
                <input value={failReason} onChange={(e) => setFailReason(e.target.value)} className="mt-1 block w-full rounded border border-oxide-500/40 bg-white px-2 py-1 text-sm" placeholder="e.g. nozzle clog at layer 212, first layer lifted" />
              </label>
              <button type="submit" disabled={busy} className={`${button} bg-oxide-500 text-white`}>Mark failed</button>
            </form>
          ) : null}
          {message ? <p role={message.tone === "danger" ? "alert" : "status"} data-testid="build-message" className={`mt-3 rounded-md px-3 py-2 text-sm ${message.tone === "danger" ? "bg-oxide-100 text-oxide-700" : "bg-verdigris-100 text-verdigris-700"}`}>{message.text}</p> : null}
        </div>

        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="mb-2 font-display text-base font-semibold text-soot-900">Plate</h2>
          {layout ? <PlateDrawing layout={layout} printerName={q.data.layout_printer} /> : <p className="text-sm text-soot-500">No printer can take these units, so there is no layout.</p>}
          {!build.printer_id && layout ? <p className="mt-1 text-2xs text-soot-500">A preview on the first printer that takes the build; the layout is fixed when it is booked.</p> : null}
        </div>

        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="mb-2 font-display text-base font-semibold text-soot-900">Units on this plate ({units.length})</h2>
          <ScrollRegion label="Units on this plate">
          <table className="w-full min-w-[36rem] text-left text-sm">
            <thead className="text-xs text-soot-500"><tr><th className="py-1">Unit</th><th>Part</th><th>Order, due</th><th className="text-right">Green size, mm</th><th className="pl-4">State</th></tr></thead>
            <tbody>
              {units.map((u) => (
                <tr key={u.id} className="border-t border-soot-100">
                  <td className="py-1 font-mono text-xs font-semibold"><Link href={`/units/${u.id}`} className="tap-target inline-flex min-h-8 items-center text-clay-800 hover:underline">{u.serial}</Link></td>
                  <td><Link href={`/parts/${u.part_id}`} className="tap-target inline-flex items-center text-clay-800 hover:underline">{u.part_number}</Link> <span className="text-xs text-soot-500">rev {u.revision} · {u.part_name}</span></td>
                  <td className="text-xs">{u.order_code} · {formatDay(u.due_at, timeZone)}</td>
                  <td className="tabular text-right text-xs">{u.green_x_mm && u.green_y_mm && u.green_z_mm ? `${u.green_x_mm.toFixed(1)} × ${u.green_y_mm.toFixed(1)} × ${u.green_z_mm.toFixed(1)}` : "–"}</td>
                  <td className="pl-4 text-xs">{u.state.replaceAll("_", " ")}</td>
                </tr>
              ))}
            </tbody>
          </table>
          </ScrollRegion>
        </div>
      </section>

      <section className="space-y-4">
        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="mb-2 font-display text-base font-semibold text-soot-900">Printers</h2>
          <ul className="space-y-1 text-sm" data-testid="build-verdicts">
            {verdicts.map((v) => (
              <li key={v.printer_id} className="flex items-baseline justify-between gap-2">
                <span className={v.printer_id === build.printer_id ? "font-semibold" : ""}>{v.printer_name}{v.printer_id === build.printer_id ? " (booked)" : ""}</span>
                {v.ok ? <span className="tabular text-verdigris-700">{minutesLabel(v.est_minutes ?? 0)}</span> : <span className="text-right text-xs text-oxide-700">{v.reason}</span>}
              </li>
            ))}
          </ul>
          <p className="mt-2 text-2xs text-soot-500">Print time: deposited green volume over the printer&apos;s rate, plus a per-layer overhead for the tallest part.</p>
        </div>
        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="mb-2 font-display text-base font-semibold text-soot-900">History</h2>
          <ol className="space-y-1.5 text-xs">
            {history.map((h) => (
              <li key={h.id}>
                <span className="tabular text-soot-500">{formatWhen(h.created_at, timeZone)}</span> · {h.actor_name ?? "Hearth"} ·{" "}
                {h.kind === "schedule" ? (h.to_state === "draft" ? "taken off the floor" : "booked / moved") : h.kind === "state" ? `${h.from_state ?? "new"} → ${h.to_state}` : h.kind}
                {h.reason ? <span className="text-soot-600">: {h.reason}</span> : null}
              </li>
            ))}
          </ol>
        </div>
      </section>
    </div>
  );
}
