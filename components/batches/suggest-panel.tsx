"use client";

import { useEffect, useRef, useState } from "react";
import { useMutation } from "@tanstack/react-query";
import { Bar, BarChart, CartesianGrid, Legend, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { can, type Role } from "@/lib/auth/permissions";
import type { ProposedRun, ProposedWash, SuggestResult } from "@/lib/batches/suggest";
import type { Board } from "@/lib/batches/types";
import { ApiError, sendJson } from "./client";
import { duration, shopTime, slackWords } from "./format";

type Proposal = SuggestResult & { id: string; planned_from: string; current: { wash_batches: number; furnace_runs: number }; server_ms: number };

export type SuggestPanelProps = { board: Board; role: Role; profileId?: string; onClose: () => void; onApplied: (message: string) => void };

export function SuggestPanel({ board, role, profileId, onClose, onApplied }: SuggestPanelProps) {
  const [error, setError] = useState<string | null>(null);
  // The packer searches for fewer runs within a time budget; "Search longer" asks again with more.
  const [budgetMs, setBudgetMs] = useState(DEFAULT_BUDGET_MS);
  const suggest = useMutation({
    mutationFn: (budget: number) =>
      sendJson<Proposal>("/api/batches/suggest", "POST", { wash: true, furnace: true, budget_ms: budget, ...(profileId ? { profile_ids: [profileId] } : {}) }),
  });
  const apply = useMutation({
    mutationFn: (id: string) => sendJson<{ wash_batches: string[]; furnace_runs: string[] }>("/api/batches/suggest/apply", "POST", { proposal_id: id }),
    onSuccess: (r) => onApplied(`Booked ${r.furnace_runs.length} furnace run${r.furnace_runs.length === 1 ? "" : "s"} and ${r.wash_batches.length} wash batch${r.wash_batches.length === 1 ? "" : "es"}.`),
    onError: (err) => setError(err instanceof ApiError ? err.message : "The server could not be reached; nothing was booked."),
  });
  const started = useRef(false);
  useEffect(() => {
    if (started.current) return;
    started.current = true;
    suggest.mutate(DEFAULT_BUDGET_MS);
  }, [suggest]);
  const elapsed = useElapsed(suggest.isPending, suggest.submittedAt);
  const searchLonger = () => {
    const next = Math.min(MAX_BUDGET_MS, budgetMs * 4);
    // The shorter search's proposal is replaced, so it is refused rather than left open.
    if (p) void sendJson("/api/batches/suggest/refuse", "POST", { proposal_id: p.id, reason: "searched longer" }).catch(() => undefined);
    setError(null);
    setBudgetMs(next);
    suggest.mutate(next);
  };

  const p = suggest.data;
  const dismiss = () => {
    if (p) void sendJson("/api/batches/suggest/refuse", "POST", { proposal_id: p.id, reason: "dismissed on the board" }).catch(() => undefined);
    onClose();
  };
  const furnaceName = (id: string) => board.furnaces.find((f) => f.id === id)?.name ?? "?";
  const stationName = (id: string) => board.stations.find((s) => s.id === id)?.name ?? "?";
  const profileName = (id: string) => board.profiles.find((x) => x.id === id)?.label ?? "?";
  const mayBookRuns = can(role, "furnace:write");
  const blocked = Boolean(p && p.furnace.length && !mayBookRuns);

  return (
    <section role="dialog" aria-label="Suggested batches" data-testid="suggest-panel" className="rounded-card border border-clay-300 bg-white p-4 shadow-card">
      <header className="flex flex-wrap items-start justify-between gap-3">
        <div>
          <h2 className="font-display text-lg font-semibold text-soot-900">Suggested batches</h2>
          <p className="text-xs text-soot-500">
            Nothing is booked until you accept. Units already in open batches and runs stay where they are.
            {profileId ? ` Only units for ${board.profiles.find((p) => p.id === profileId)?.label ?? "the chosen profile"}, as the board is filtered.` : ""}
          </p>
        </div>
        <button type="button" onClick={dismiss} className="rounded border border-soot-200 px-2.5 py-1 text-xs text-soot-700 hover:bg-soot-100">
          Dismiss
        </button>
      </header>
      {suggest.isPending ? (
        <div className="mt-3 space-y-1" data-testid="suggest-progress">
          <p className="text-sm text-soot-500" aria-live="polite">
            Packing the waiting units… searching for fewer runs, {(elapsed / 1000).toFixed(1)} s of up to {(budgetMs / 1000).toFixed(budgetMs < 10_000 ? 1 : 0)} s
          </p>
          <progress className="h-1.5 w-full accent-clay-600" max={budgetMs} value={Math.min(elapsed, budgetMs)} aria-label="Search time used" />
        </div>
      ) : null}
      {suggest.isError ? <p role="alert" className="mt-3 text-sm text-oxide-700">{(suggest.error as Error).message}</p> : null}
      {p ? (
        <div className="mt-3 space-y-4">
          <dl className="grid grid-cols-2 gap-3 text-sm sm:grid-cols-4" data-testid="suggest-metrics">
            <Metric label="Furnace runs proposed" value={String(p.metrics.furnace_runs)} note={`for ${p.metrics.furnace_units} units`} />
            <Metric
              label="Lower bound"
              value={String(p.metrics.lower_bound)}
              note={p.metrics.lower_bound ? `runs ÷ bound = ${p.metrics.ratio.toFixed(2)}` : "nothing to pack"}
            />
            <Metric label="Wash batches proposed" value={String(p.metrics.wash_batches)} note={`for ${p.metrics.wash_units} units`} />
            <Metric label="Open now" value={`${p.current.furnace_runs} runs · ${p.current.wash_batches} washes`} note={`worked out in ${p.server_ms} ms`} />
          </dl>
          <SearchNote p={p} canExtend={budgetMs < MAX_BUDGET_MS} onLonger={searchLonger} busy={suggest.isPending} />
          {p.furnace.length ? <RunFillChart runs={p.furnace} /> : null}
          {p.furnace.length ? (
            <DiffTable
              title="Furnace runs to book"
              head={["", "Furnace", "Profile", "Loads", "Cycle", "Units", "Load", "Tray area", "Latest part"]}
              rows={p.furnace.map((r: ProposedRun) => [
                "+",
                furnaceName(r.furnace_id),
                profileName(r.profile_id),
                shopTime(r.starts_at, board.time_zone),
                duration(r.cycle_minutes),
                String(r.units.length),
                `${Math.round((r.mass_g / (board.furnaces.find((f) => f.id === r.furnace_id)?.max_load_g ?? 1)) * 100)} %`,
                `${Math.round(r.area_used_fraction * 100)} %`,
                slackWords(-r.max_lateness_min),
              ])}
            />
          ) : null}
          {p.wash.length ? (
            <DiffTable
              title="Wash batches to book"
              head={["", "Station", "Basket in", "Wash", "Units", "Mass"]}
              rows={p.wash.map((w: ProposedWash) => ["+", stationName(w.wash_station_id), shopTime(w.starts_at, board.time_zone), duration(w.est_minutes), String(w.units.length), `${Math.round(w.mass_g)} g`])}
            />
          ) : null}
          {p.unplaced.length ? (
            <div>
              <h3 className="text-sm font-semibold text-soot-800">Left waiting ({p.unplaced.length})</h3>
              <ul className="mt-1 list-disc pl-5 text-xs text-soot-700">
                {p.unplaced.map((u) => (
                  <li key={u.unit_id}>
                    <span className="font-mono">{u.serial}</span>: {u.reason}
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
          {!p.furnace.length && !p.wash.length ? <p className="text-sm text-soot-600">Nothing is waiting that could be batched.</p> : null}
          {error ? (
            <p role="alert" className="rounded bg-oxide-100 px-2 py-1 text-sm text-oxide-700" data-testid="suggest-error">
              {error}
            </p>
          ) : null}
          {blocked ? <p className="text-xs text-brass-600">Booking furnace runs needs a furnace operator or an admin.</p> : null}
          <div className="flex gap-2">
            <button
              type="button"
              disabled={apply.isPending || blocked || (!p.furnace.length && !p.wash.length)}
              onClick={() => apply.mutate(p.id)}
              className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50"
              data-testid="suggest-accept"
            >
              {apply.isPending ? "Booking…" : "Accept and book"}
            </button>
            <button type="button" onClick={() => (setError(null), suggest.mutate(budgetMs))} className="rounded-md border border-soot-200 px-3 py-1.5 text-sm text-soot-700 hover:bg-soot-100">
              Suggest again
            </button>
          </div>
        </div>
      ) : null}
    </section>
  );
}

const DEFAULT_BUDGET_MS = 1_000;
/** The API's limit (lib/batches/schemas.ts). */
const MAX_BUDGET_MS = 30_000;

/** Milliseconds since `since` while `running`, updated ten times a second (0 otherwise). */
function useElapsed(running: boolean, since: number): number {
  const [now, setNow] = useState(0);
  useEffect(() => {
    if (!running) return;
    const timer = setInterval(() => setNow(Date.now()), 100);
    return () => clearInterval(timer);
  }, [running]);
  return running && since > 0 ? Math.max(0, now - since) : 0;
}

/** How far the proposal is from the bound, and whether a longer search could still help. */
function SearchNote({ p, canExtend, onLonger, busy }: { p: Proposal; canExtend: boolean; onLonger: () => void; busy: boolean }) {
  const s = p.metrics.search;
  if (!p.metrics.lower_bound || !s) return null;
  const gap = p.metrics.furnace_runs - p.metrics.lower_bound;
  const searched = s.budget_ms ? ` The search took ${(s.ms / 1000).toFixed(1)} s of ${(s.budget_ms / 1000).toFixed(1)} s` : "";
  const saved = s.start_runs > p.metrics.furnace_runs ? ` and saved ${s.start_runs - p.metrics.furnace_runs} run${s.start_runs - p.metrics.furnace_runs === 1 ? "" : "s"}.` : searched ? "." : "";
  return (
    <div className="flex flex-wrap items-center gap-3 rounded-md border border-soot-200 px-3 py-2 text-sm" data-testid="suggest-search">
      <p className="text-soot-700">
        <span className="tabular font-semibold">
          Runs {p.metrics.furnace_runs}, lower bound {p.metrics.lower_bound}
        </span>
        {gap <= 0 ? " — no plan can use fewer runs." : ` — at most ${gap} run${gap === 1 ? "" : "s"} could still be saved (the bound may not be reachable).`}
        {searched}
        {saved}
      </p>
      {gap > 0 && s.stop !== "bound" && canExtend ? (
        <button type="button" onClick={onLonger} disabled={busy} className="rounded-md border border-clay-300 px-3 py-1.5 text-sm text-clay-700 hover:bg-clay-50 disabled:opacity-50" data-testid="suggest-longer">
          Search longer
        </button>
      ) : null}
    </div>
  );
}

function Metric({ label, value, note }: { label: string; value: string; note: string }) {
  return (
    <div className="rounded-md border border-soot-200 bg-soot-50 px-3 py-2">
      <dt className="text-2xs text-soot-500">{label}</dt>
      <dd className="tabular font-display text-lg font-semibold text-soot-900">{value}</dd>
      <dd className="text-2xs text-soot-500">{note}</dd>
    </div>
  );
}

function DiffTable({ title, head, rows }: { title: string; head: string[]; rows: string[][] }) {
  return (
    <div>
      <h3 className="text-sm font-semibold text-soot-800">{title}</h3>
      <div className="mt-1 overflow-x-auto">
        <table className="w-full text-left text-xs">
          <thead className="text-2xs text-soot-500">
            <tr>
              {head.map((h, i) => (
                <th key={i} className="px-2 py-1 font-medium">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.map((r, i) => (
              <tr key={i} className="border-t border-soot-100 bg-verdigris-100/30">
                {r.map((c, j) => (
                  <td key={j} className={`px-2 py-1 ${j === 0 ? "font-bold text-verdigris-700" : "tabular text-soot-800"}`}>
                    {c}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}

/** How full each proposed run is, by tray area and by load: the figures a planner compares. */
function RunFillChart({ runs }: { runs: ProposedRun[] }) {
  const data = runs.map((r, i) => ({ name: `#${i + 1}`, area: Math.round(r.area_used_fraction * 100), units: r.units.length }));
  return (
    <div className="h-40" data-testid="suggest-chart">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 8, right: 12, left: 0, bottom: 0 }}>
          <CartesianGrid strokeDasharray="3 3" stroke="#e9e6e1" />
          <XAxis dataKey="name" tick={{ fontSize: 11 }} />
          <YAxis yAxisId="pct" domain={[0, 100]} unit=" %" tick={{ fontSize: 11 }} width={44} />
          <YAxis yAxisId="n" orientation="right" tick={{ fontSize: 11 }} width={28} />
          <Tooltip />
          <Legend wrapperStyle={{ fontSize: 11 }} />
          <ReferenceLine yAxisId="pct" y={100} stroke="#c0392b" strokeDasharray="4 3" />
          <Bar yAxisId="pct" dataKey="area" name="Tray area used (%)" fill="#c46535" />
          <Bar yAxisId="n" dataKey="units" name="Units" fill="#4a6076" />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
