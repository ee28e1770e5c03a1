"use client";

import { useEffect, useState } from "react";
import { ApiError, apiJson } from "./api";
import { formatWhen, minutesLabel } from "./format";

export type Proposal = {
  id: string;
  status: string;
  planned_from: string;
  items: Array<{ build_id: string; code: string; material_code: string; printer_id: string; printer_name: string; starts_at: string; ends_at: string; due_at: string | null; lateness_min: number; feedstock_short?: string }>;
  unplaced: Array<{ build_id: string; code: string; reason: string; printer_reasons: (string | null)[] }>;
  metrics: { builds: number; placed: number; makespan_min: number; makespan_lower_bound_min: number; max_lateness_min: number; total_lateness_min: number; late_count: number; plan_ms: number; search_timed_out?: boolean };
};

const DEFAULT_BUDGET_MS = 2_000;
/** The API's limit (lib/floor/schemas.ts). */
const MAX_BUDGET_MS = 30_000;

export type PlanPanelProps = {
  proposal: Proposal | null;
  setProposal: (p: Proposal | null) => void;
  canApply: boolean;
  /** The shop's time zone, as on the floor. */
  timeZone: string;
  onApplied: (message: string) => void | Promise<void>;
  onError: (message: string) => void;
};

/** Propose plan: the planner's bookings as a diff against today's floor; nothing changes until Apply. */
export function PlanPanel({ proposal, setProposal, canApply, timeZone, onApplied, onError }: PlanPanelProps) {
  const [busy, setBusy] = useState(false);
  // The planner's search runs within a time budget; "Search longer" asks again with more.
  const [budgetMs, setBudgetMs] = useState(DEFAULT_BUDGET_MS);
  const [startedAt, setStartedAt] = useState(0);
  const [now, setNow] = useState(0);
  useEffect(() => {
    if (!busy) return;
    const timer = setInterval(() => setNow(Date.now()), 100);
    return () => clearInterval(timer);
  }, [busy]);
  const elapsed = busy && startedAt > 0 ? Math.max(0, now - startedAt) : 0;

  async function propose(budget = budgetMs) {
    setBusy(true);
    setStartedAt(Date.now());
    setBudgetMs(budget);
    try {
      const res = await apiJson<{ proposal: Proposal }>("/api/plans", { method: "POST", body: { budget_ms: budget } });
      setProposal(res.proposal);
    } catch (err) {
      onError(`No plan: ${(err as Error).message}`);
    } finally {
      setBusy(false);
    }
  }

  async function decide(decision: "apply" | "refuse") {
    if (!proposal) return;
    setBusy(true);
    try {
      await apiJson(`/api/plans/${proposal.id}`, { method: "PATCH", body: { decision } });
      setProposal(null);
      if (decision === "apply") await onApplied(`Plan applied: ${proposal.items.length} build(s) booked.`);
    } catch (err) {
      const e = err as ApiError;
      onError(e.status === 409 ? `${e.message}` : `The plan was not applied: ${e.message}`);
      if (e.status === 409) setProposal(null);
    } finally {
      setBusy(false);
    }
  }

  const m = proposal?.metrics;
  return (
    <section className="rounded-card border border-soot-200 bg-white p-3 shadow-card" aria-labelledby="plan-heading" data-testid="plan-panel">
      <div className="flex items-center justify-between gap-2">
        <h2 id="plan-heading" className="font-display text-base font-semibold text-soot-900">Propose plan</h2>
        <button type="button" onClick={() => propose()} disabled={busy} className="rounded-md border border-verdigris-500 px-2.5 py-1 text-xs font-semibold text-verdigris-700 hover:bg-verdigris-100 disabled:opacity-60">
          {busy && !proposal ? "Planning…" : proposal ? "Propose again" : "Propose plan"}
        </button>
      </div>
      <p className="mt-1 text-xs text-soot-500">
        Unscheduled builds onto compatible printers by due date, around maintenance and existing bookings, starting in staffed hours. Shown in green on the timeline; booked only when applied.
      </p>
      {busy ? (
        <p className="mt-2 text-2xs text-soot-500" aria-live="polite" data-testid="plan-progress">
          Planning… {(elapsed / 1000).toFixed(1)} s of up to {(budgetMs / 1000).toFixed(1)} s
        </p>
      ) : null}
      {proposal ? (
        <div className="mt-3">
          <p className="text-xs text-soot-700" data-testid="plan-bound">
            Makespan {minutesLabel(m!.makespan_min)}, lower bound {minutesLabel(m!.makespan_lower_bound_min)}
            {m!.makespan_lower_bound_min > 0 ? ` (${((m!.makespan_min / m!.makespan_lower_bound_min - 1) * 100).toFixed(1)} % above; the bound may not be reachable)` : ""}
            {m!.search_timed_out && budgetMs < MAX_BUDGET_MS ? (
              <button type="button" onClick={() => propose(Math.min(MAX_BUDGET_MS, budgetMs * 4))} disabled={busy} className="ml-2 rounded border border-verdigris-500 px-2 py-0.5 text-2xs text-verdigris-700 hover:bg-verdigris-100 disabled:opacity-60" data-testid="plan-longer">
                Search longer
              </button>
            ) : null}
          </p>
          <dl className="grid grid-cols-2 gap-x-3 gap-y-1 text-xs">
            <dt className="text-soot-500">Placed</dt>
            <dd className="tabular font-semibold">{m!.placed} of {m!.builds}</dd>
            <dt className="text-soot-500">Makespan</dt>
            <dd className="tabular font-semibold">{minutesLabel(m!.makespan_min)}</dd>
            <dt className="text-soot-500">Lower bound</dt>
            <dd className="tabular">{minutesLabel(m!.makespan_lower_bound_min)}</dd>
            <dt className="text-soot-500">Late builds</dt>
            <dd className="tabular font-semibold">{m!.late_count}</dd>
            <dt className="text-soot-500">Worst lateness</dt>
            <dd className="tabular">{m!.max_lateness_min ? minutesLabel(m!.max_lateness_min) : "none"}</dd>
          </dl>
          <div className="mt-2 max-h-72 overflow-auto">
            <table className="w-full text-left text-2xs" data-testid="plan-diff">
              <thead className="text-soot-500">
                <tr>
                  <th className="py-1 pr-1">Build</th>
                  <th className="pr-1">Printer</th>
                  <th className="pr-1">Start → end</th>
                  <th>Late</th>
                </tr>
              </thead>
              <tbody>
                {proposal.items.map((i) => (
                  <tr key={i.build_id} className="border-t border-soot-100 align-top">
                    <td className="py-1 pr-1 font-semibold text-verdigris-700">
                      + {i.code}
                      {i.feedstock_short ? <span className="block text-2xs font-semibold text-oxide-700">No feedstock: {i.feedstock_short}</span> : null}
                    </td>
                    <td className="pr-1">{i.printer_name}</td>
                    <td className="tabular pr-1">{formatWhen(i.starts_at, timeZone)} → {formatWhen(i.ends_at, timeZone)}</td>
                    <td className={`tabular ${i.lateness_min > 0 ? "font-semibold text-oxide-700" : "text-soot-500"}`}>{i.lateness_min > 0 ? minutesLabel(i.lateness_min) : "on time"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            {proposal.unplaced.length ? (
              <ul className="mt-2 space-y-1 text-2xs text-oxide-700">
                {proposal.unplaced.map((u) => (
                  <li key={u.build_id}>
                    <span className="font-semibold">{u.code}</span> not placed: {u.reason}
                  </li>
                ))}
              </ul>
            ) : null}
            {proposal.items.length === 0 && proposal.unplaced.length === 0 ? <p className="text-xs text-soot-500">Nothing to plan: every build is booked.</p> : null}
          </div>
          <div className="mt-3 flex gap-2">
            {canApply ? (
              <button type="button" onClick={() => decide("apply")} disabled={busy || proposal.items.length === 0} className="rounded-md bg-verdigris-500 px-3 py-1.5 text-sm font-semibold text-white hover:bg-verdigris-700 disabled:opacity-60">
                Apply plan
              </button>
            ) : null}
            <button type="button" onClick={() => decide("refuse")} disabled={busy} className="rounded-md border border-soot-300 px-3 py-1.5 text-sm font-semibold text-soot-700 hover:bg-soot-100 disabled:opacity-60">
              Discard
            </button>
          </div>
        </div>
      ) : null}
    </section>
  );
}
