"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import Link from "next/link";
import { useEffect, useState, type ReactNode } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { can, type Role } from "@/lib/auth/permissions";
import { LOADING_CHECKLIST, missingChecks } from "@/lib/batches/checklist";
import { SCRAP_REASONS } from "@/lib/batches/schemas";
import { furnaceGauges } from "@/lib/batches/rules";
import type { RunDetail } from "@/lib/batches/types";
import { formatLength } from "@/lib/units";
import { ApiError, getJson, sendJson } from "@/components/batches/client";
import { duration, massText, shopTime } from "@/components/batches/format";
import { GaugeBar } from "@/components/batches/gauge";
import { QueryProvider } from "@/components/floor/query-provider";
import { Fact } from "@/components/ui/fact";
import { LiveIndicator, useLivePoll } from "@/components/live/live-updates";
import { ProfileChart } from "./profile-chart";
import { TrayDrawing } from "./tray-drawing";

export type RunViewProps = { runId: string; role: Role; unitPref: "mm" | "in" };

const STATE_WORDS: Record<string, string> = { draft: "Draft", scheduled: "Booked", running: "Running", complete: "Complete", cancelled: "Cancelled" };
const REASON_WORDS: Record<string, string> = { print_failure: "Print failure", crack: "Crack", slump: "Slump", warp: "Warp", out_of_tolerance: "Out of tolerance", other: "Other" };

export function RunView(props: RunViewProps) {
  return (
    <QueryProvider>
      <RunViewInner {...props} />
    </QueryProvider>
  );
}

function useNow(ms = 30_000) {
  const [now, setNow] = useState(() => Date.now());
  useEffect(() => {
    const t = setInterval(() => setNow(Date.now()), ms);
    return () => clearInterval(t);
  }, [ms]);
  return now;
}

function RunViewInner({ runId, role, unitPref }: RunViewProps) {
  const qc = useQueryClient();
  const poll = useLivePoll();
  const q = useQuery({ queryKey: ["furnace-run", runId], queryFn: () => getJson<RunDetail>(`/api/furnace-runs/${runId}`), refetchInterval: poll(30_000) });
  const now = useNow();
  const [flash, setFlash] = useState<{ tone: "danger" | "success"; text: string } | null>(null);
  const act = useMutation({
    mutationFn: (c: { url: string; body: unknown; done: string }) => sendJson(c.url, "POST", c.body),
    onSuccess: (_r, c) => setFlash({ tone: "success", text: c.done }),
    onError: (err) => setFlash({ tone: "danger", text: err instanceof ApiError ? err.message : "The server could not be reached; nothing was changed." }),
    onSettled: () => void qc.invalidateQueries({ queryKey: ["furnace-run", runId] }),
  });

  if (q.isError) return <p role="alert" className="text-sm text-oxide-700">{(q.error as Error).message}</p>;
  const d = q.data;
  if (!d) return <p className="text-sm text-soot-500">Loading the run…</p>;
  const { run, furnace, profile } = d;
  const tz = d.time_zone;
  const running = run.state === "running";
  const startMs = run.starts_at ? Date.parse(run.starts_at) : null;
  const nowMinute = running && startMs !== null ? (now - startMs) / 60_000 : null;
  const ended = run.ends_at ? now >= Date.parse(run.ends_at) : false;
  const canOperate = can(role, "furnace:operate");
  const peak = Math.max(...d.curve.map((p) => p.temp_c));
  const labels = Object.fromEntries(run.units.map((u) => [u.id, u.serial]));
  const checklistShown = (run.state === "draft" || run.state === "scheduled") && canOperate;
  const mayUnload = canOperate && !d.unloaded_at && (run.state === "complete" || (running && ended));

  return (
    <div className="space-y-3 sm:space-y-5">
      {/* With the checklist shown, the live mark sits in its heading row: one row less above the
          start button on a phone. */}
      {checklistShown ? null : <LiveIndicator />}
      {flash ? (
        <div role={flash.tone === "danger" ? "alert" : "status"} data-testid="run-flash" className={`rounded-card border px-3 py-2 text-sm ${flash.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700"}`}>
          {flash.text}
        </div>
      ) : null}
      {/* The operator's next action (the checklist and start, or the unload) leads, so that on a
          phone it is on the first screen; the run's facts, curve and trays follow. */}
      {checklistShown ? (
        <LoadingChecklist
          live={<LiveIndicator />}
          busy={act.isPending}
          disabled={run.units.length === 0}
          onStart={(checklist) => act.mutate({ url: `/api/furnace-runs/${run.id}/start`, body: { version: run.version, checklist }, done: `${run.code} started.` })}
        />
      ) : null}
      {d.checklist && run.state !== "draft" && run.state !== "scheduled" ? (
        <section className="rounded-card border border-soot-200 bg-white p-4 text-xs text-soot-600" data-testid="checklist-record">
          Loading checklist confirmed {typeof d.checklist.confirmed_at === "string" ? shopTime(d.checklist.confirmed_at, tz) : ""}:{" "}
          {LOADING_CHECKLIST.filter((c) => d.checklist?.[c.key] === true).length} of {LOADING_CHECKLIST.length} items.
        </section>
      ) : null}
      {mayUnload ? (
        <UnloadForm
          units={run.units.filter((u) => ["sintering", "sintered", "ready_for_finishing"].includes(d.outcomes.find((o) => o.unit_id === u.id)?.state ?? u.state)).map((u) => ({ id: u.id, serial: u.serial }))}
          busy={act.isPending}
          onSubmit={(outcomes) => act.mutate({ url: `/api/furnace-runs/${run.id}/unload`, body: { version: run.version, outcomes }, done: `Unload of ${run.code} recorded.` })}
        />
      ) : running && canOperate ? (
        <p className="text-sm text-soot-600">The unload form opens when the cycle, cool-down included, is over ({shopTime(run.ends_at, tz)}).</p>
      ) : null}
      <section className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-5" aria-label="Run summary">
        <Fact label="State" value={STATE_WORDS[run.state]} testId="run-state" />
        <Fact label="Furnace" value={furnace.name} note={`${furnace.tray_count} trays of ${furnace.tray_x_mm}×${furnace.tray_y_mm} mm, ${furnace.usable_height_mm} mm high`} />
        <Fact label="Sinter profile" value={profile.label} note={`${profile.name} · ${profile.atmosphere}`} />
        <Fact label="Cycle" value={duration(run.cycle_minutes ?? d.cycle.total_minutes)} note={`peak ${Math.round(peak)} °C`} />
        <Fact
          label={running ? "Running" : run.starts_at ? "Booked" : "Not booked"}
          value={run.starts_at ? `${shopTime(run.starts_at, tz)} → ${shopTime(run.ends_at, tz, false)}` : "—"}
          note={running && run.ends_at ? (ended ? "cycle over: unload when cool" : `ends ${shopTime(run.ends_at, tz)}`) : d.unloaded_at ? `unloaded ${shopTime(d.unloaded_at, tz)}` : ""}
        />
      </section>

      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
        <h2 className="text-sm font-semibold text-soot-800">Temperature against time</h2>
        <ProfileChart curve={d.curve} nowMinute={nowMinute} startsAt={run.starts_at} timeZone={tz} />
      </section>

      <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
        <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="text-sm font-semibold text-soot-800">Trays</h2>
          <div className="mt-2 grid gap-1.5">
            {furnaceGauges(run.tray_layout, run.units, furnace).map((g) => (
              <GaugeBar key={g.key} gauge={g} />
            ))}
          </div>
          <div className="mt-3">
            <TrayDrawing layout={run.tray_layout} tray_x_mm={furnace.tray_x_mm} tray_y_mm={furnace.tray_y_mm} tray_count={furnace.tray_count} clearance_mm={d.clearance_mm} labels={labels} width={200} />
          </div>
        </section>
        <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="text-sm font-semibold text-soot-800">Units ({run.units.length})</h2>
          <ScrollRegion label="Units on the run"><table className="mt-2 w-full text-left text-xs">
            <thead className="text-2xs text-soot-500">
              <tr>
                <th className="py-1 font-medium">Unit</th>
                <th className="py-1 font-medium">Part</th>
                <th className="py-1 font-medium">Green size</th>
                <th className="py-1 font-medium">Mass</th>
                <th className="py-1 font-medium">State</th>
              </tr>
            </thead>
            <tbody>
              {run.units.map((u) => {
                const o = d.outcomes.find((x) => x.unit_id === u.id);
                return (
                  <tr key={u.id} className="border-t border-soot-100">
                    <td className="py-1 font-mono">{u.serial}</td>
                    <td className="py-1">{u.part_name}</td>
                    <td className="tabular py-1">
                      {formatLength(u.green_x_mm, unitPref, 1)} × {formatLength(u.green_y_mm, unitPref, 1)} × {formatLength(u.green_z_mm, unitPref, 1)}
                    </td>
                    <td className="tabular py-1">{massText(u.mass_g, unitPref)}</td>
                    <td className="py-1">
                      {(o?.state ?? u.state).replace(/_/g, " ")}
                      {o?.scrap_reason ? ` (${REASON_WORDS[o.scrap_reason] ?? o.scrap_reason}${o.scrap_note ? `: ${o.scrap_note}` : ""})` : ""}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table></ScrollRegion>
          {run.state === "draft" || run.state === "scheduled" ? (
            <p className="mt-2 text-2xs text-soot-500">
              Add or take out units on the <Link href="/batches" className="underline">batching board</Link>.
            </p>
          ) : null}
        </section>
      </div>

    </div>
  );
}

function LoadingChecklist({ busy, disabled, onStart, live }: { busy: boolean; disabled: boolean; onStart: (c: Record<string, boolean>) => void; live: ReactNode }) {
  const [ticks, setTicks] = useState<Record<string, boolean>>({});
  const missing = missingChecks(ticks);
  return (
    <section className="rounded-card border border-clay-300 bg-white p-4 shadow-card" aria-label="Loading checklist" data-testid="loading-checklist">
      <div className="flex items-center justify-between gap-2">
        <h2 className="text-sm font-semibold text-soot-800">Loading checklist</h2>
        {live}
      </div>
      <p className="text-2xs text-soot-500">Tick each item as it is done; the run can start only when all are ticked. The furnace maker&apos;s procedure comes first.</p>
      {/* On a touch screen each label is a 44 px target already (globals.css): no gap between them,
          so that the start button stays on a phone's first screen. */}
      <ul className="mt-2 space-y-1.5 pointer-coarse:space-y-0">
        {LOADING_CHECKLIST.map((c) => (
          <li key={c.key}>
            <label className="flex items-start gap-2 text-sm text-soot-800 pointer-coarse:items-center">
              <input type="checkbox" className="mt-0.5 pointer-coarse:mt-0 shrink-0" checked={ticks[c.key] === true} onChange={(e) => setTicks({ ...ticks, [c.key]: e.target.checked })} name={c.key} />
              {c.label}
            </label>
          </li>
        ))}
      </ul>
      <button
        type="button"
        disabled={busy || disabled || missing.length > 0}
        onClick={() => onStart(ticks)}
        className="mt-3 w-full rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50 sm:w-auto"
      >
        {busy ? "Starting…" : missing.length ? `Start run (${missing.length} to tick)` : "Start run now"}
      </button>
      {disabled ? <p className="mt-1 text-2xs text-soot-500">The run is empty.</p> : null}
    </section>
  );
}

type Outcome = { unit_id: string; outcome: "sintered" | "scrapped"; scrap_reason?: string; scrap_note?: string };

function UnloadForm({ units, busy, onSubmit }: { units: { id: string; serial: string }[]; busy: boolean; onSubmit: (o: Outcome[]) => void }) {
  const [rows, setRows] = useState<Record<string, Outcome>>(() => Object.fromEntries(units.map((u) => [u.id, { unit_id: u.id, outcome: "sintered" }])));
  const set = (id: string, patch: Partial<Outcome>) => setRows({ ...rows, [id]: { ...rows[id], ...patch } });
  const incomplete = Object.values(rows).some((r) => r.outcome === "scrapped" && !r.scrap_reason);
  return (
    <section className="rounded-card border border-clay-300 bg-white p-4 shadow-card" aria-label="Unload" data-testid="unload-form">
      <h2 className="text-sm font-semibold text-soot-800">Unload</h2>
      <p className="text-2xs text-soot-500">Unload only once the furnace reports the load cool enough to handle. Record each unit as it comes off the tray.</p>
      <ScrollRegion label="Unload outcomes"><table className="mt-2 w-full text-left text-xs">
        <tbody>
          {units.map((u) => {
            const r = rows[u.id] ?? { unit_id: u.id, outcome: "sintered" };
            return (
              <tr key={u.id} className="border-t border-soot-100" data-unit-id={u.id}>
                <td className="py-1.5 pr-2 font-mono">{u.serial}</td>
                <td className="py-1.5 pr-2">
                  <label className="mr-3 inline-flex items-center gap-1">
                    <input type="radio" name={`o-${u.id}`} checked={r.outcome === "sintered"} onChange={() => set(u.id, { outcome: "sintered", scrap_reason: undefined })} /> Sintered
                  </label>
                  <label className="inline-flex items-center gap-1">
                    <input type="radio" name={`o-${u.id}`} checked={r.outcome === "scrapped"} onChange={() => set(u.id, { outcome: "scrapped" })} /> Scrapped
                  </label>
                </td>
                <td className="py-1.5 pr-2">
                  {r.outcome === "scrapped" ? (
                    <select aria-label={`Reason for ${u.serial}`} value={r.scrap_reason ?? ""} onChange={(e) => set(u.id, { scrap_reason: e.target.value || undefined })} className="rounded border border-soot-200 px-1 py-0.5">
                      <option value="">Reason…</option>
                      {SCRAP_REASONS.map((s) => (
                        <option key={s} value={s}>
                          {REASON_WORDS[s]}
                        </option>
                      ))}
                    </select>
                  ) : null}
                </td>
                <td className="py-1.5">
                  {r.outcome === "scrapped" ? (
                    <input aria-label={`Note for ${u.serial}`} value={r.scrap_note ?? ""} onChange={(e) => set(u.id, { scrap_note: e.target.value })} placeholder="What you saw" className="w-full rounded border border-soot-200 px-1 py-0.5" />
                  ) : null}
                </td>
              </tr>
            );
          })}
        </tbody>
      </table></ScrollRegion>
      <button
        type="button"
        disabled={busy || incomplete || units.length === 0}
        onClick={() => onSubmit(Object.values(rows).map((r) => (r.outcome === "sintered" ? { unit_id: r.unit_id, outcome: "sintered" } : { ...r, scrap_note: r.scrap_note || undefined })))}
        className="mt-3 rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50"
      >
        {busy ? "Recording…" : "Record unload"}
      </button>
    </section>
  );
}
