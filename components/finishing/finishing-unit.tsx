"use client";

import Link from "next/link";
import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { UnitSystem } from "@/lib/units";
import { ACTION_LABELS, INSPECTABLE } from "@/lib/finishing/transitions";
import type { FinishingAction } from "@/lib/finishing/schemas";
import type { StockCheck } from "@/lib/finishing/inspection";
import type { FinishingCard, InspectionView } from "@/lib/finishing/types";
import { ApiError, getJson, sendJson } from "./api";
import { formatWhen, stateLabel, stockCheckText } from "./format";
import { InspectionForm } from "./inspection-form";
import { InspectionList } from "./inspection-list";
import { QueryProvider } from "@/components/floor/query-provider";
import { StateBadge } from "./state-badge";
import { UnitFacts } from "./unit-facts";

export type FinishingUnitProps = { unitId: string; units: UnitSystem; timeZone: string; canWrite: boolean; canInspect: boolean };

type Detail = { unit: FinishingCard; inspections: InspectionView[] };

export function FinishingUnit(props: FinishingUnitProps) {
  return (
    <QueryProvider>
      <Inner {...props} />
    </QueryProvider>
  );
}

function Inner({ unitId, units, timeZone, canWrite, canInspect }: FinishingUnitProps) {
  const qc = useQueryClient();
  const key = ["finishing-unit", unitId];
  const detail = useQuery({ queryKey: key, queryFn: () => getJson<Detail>(`/api/finishing/${unitId}`) });
  const [flash, setFlash] = useState<{ tone: "danger" | "success" | "warning"; text: string } | null>(null);
  const [reason, setReason] = useState("");
  const act = useMutation({
    mutationFn: (v: { action: FinishingAction; reason?: string }) =>
      sendJson<{ unit: FinishingCard }>(`/api/finishing/${unitId}`, "POST", { action: v.action, version: detail.data!.unit.version, reason: v.reason }),
    onSuccess: (res) => {
      setFlash({ tone: "success", text: `Now ${stateLabel(res.unit.state)}.` });
      setReason("");
      qc.invalidateQueries({ queryKey: key });
    },
    onError: (err) => {
      setFlash({ tone: "danger", text: err instanceof ApiError ? err.message : "The change did not go through." });
      qc.invalidateQueries({ queryKey: key });
    },
  });

  if (detail.isPending) return <p className="text-sm text-soot-500">Loading…</p>;
  if (detail.isError) return <p className="text-sm text-oxide-700">{detail.error.message}</p>;
  const { unit, inspections } = detail.data;
  const inspectable = INSPECTABLE.includes(unit.state);
  const onSaved = (r: { stock_check: StockCheck | null }) => {
    // The server's check is the one kept with the record; it is shown in the reader's units.
    setFlash(
      r.stock_check?.status === "warning"
        ? { tone: "warning", text: `Inspection saved. Stock warning: ${stockCheckText(r.stock_check, units)}` }
        : { tone: "success", text: "Inspection saved." },
    );
    qc.invalidateQueries({ queryKey: key });
  };
  const needsReason = (a: FinishingAction) => a === "hold";

  return (
    <div className="grid grid-cols-1 gap-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,1.15fr)]">
      <div className="space-y-4">
        <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label="Unit">
          <div className="flex flex-wrap items-center gap-2">
            <h2 className="font-mono text-lg font-semibold text-soot-900" data-testid="unit-serial">{unit.serial}</h2>
            <StateBadge state={unit.state} />
          </div>
          <p className="mt-1 text-sm text-soot-800">
            {unit.part.part_number} rev {unit.part.revision} · {unit.part.name} · <span className="font-semibold">{unit.material.name}</span>
          </p>
          <p className="text-xs text-soot-500">
            {unit.order.code} for {unit.order.customer} · due {formatWhen(unit.order.due_at, timeZone)} · priority {unit.order.priority}
          </p>
          <div className="mt-1 flex flex-wrap gap-x-3 text-xs">
            {unit.build ? (
              <>
                <a className="tap-target inline-flex items-center text-clay-700 hover:underline" href={`/api/builds/${unit.build.id}/traveler`} target="_blank" rel="noreferrer">Traveler (PDF)</a>
                <Link className="tap-target inline-flex items-center text-clay-700 hover:underline" href={`/builds/${unit.build.id}`}>Build {unit.build.code}</Link>
              </>
            ) : null}
            {unit.furnace_run ? <Link className="tap-target inline-flex items-center text-clay-700 hover:underline" href={`/furnace-runs/${unit.furnace_run.id}`}>Furnace run {unit.furnace_run.code}</Link> : null}
            <Link className="tap-target inline-flex items-center text-clay-700 hover:underline" href={`/units/${unit.id}`}>Full trace</Link>
          </div>
          <div className="mt-3">
            <UnitFacts unit={unit} units={units} />
          </div>
          {unit.hold_reason ? <p className="mt-2 text-sm text-brass-600">On hold: {unit.hold_reason}</p> : null}
          {unit.scrap_note ? <p className="mt-2 text-sm text-oxide-700">Scrapped: {unit.scrap_note}</p> : null}
        </section>

        {flash ? (
          <div role={flash.tone === "danger" ? "alert" : "status"} data-testid="unit-flash" className={`rounded-card border px-4 py-2 text-sm ${flash.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : flash.tone === "warning" ? "border-brass-400/50 bg-brass-100 text-brass-600" : "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700"}`}>
            {flash.text}
          </div>
        ) : null}

        {canWrite && unit.actions.length ? (
          <section className="rounded-card border border-soot-200 bg-white p-4" aria-label="Actions">
            <h3 className="text-sm font-semibold text-soot-800">Move the unit on</h3>
            <div className="mt-2 flex flex-wrap gap-2">
              {unit.actions.map((a) => (
                <button
                  key={a}
                  type="button"
                  disabled={act.isPending || (needsReason(a) && !reason.trim())}
                  onClick={() => act.mutate({ action: a, reason: reason.trim() || undefined })}
                  className={`rounded-md px-3 py-1.5 text-sm font-semibold disabled:opacity-50 ${a === "scrap" ? "bg-oxide-500 text-white hover:bg-oxide-700" : a === "hold" ? "border border-brass-400 text-brass-600 hover:bg-brass-100" : a === "finish" ? "bg-verdigris-500 text-white hover:bg-verdigris-700" : "bg-clay-600 text-white hover:bg-clay-700"}`}
                >
                  {ACTION_LABELS[a]}
                </button>
              ))}
            </div>
            <label className="mt-2 block text-xs text-soot-600">
              Reason (needed to hold; kept with the change)
              <input value={reason} onChange={(e) => setReason(e.target.value)} className="mt-1 w-full rounded-md border border-soot-300 px-2 py-1 text-sm" aria-label="Reason for the change" />
            </label>
            {unit.state === "finishing" && !unit.latest_inspection ? <p className="mt-2 text-xs text-soot-500">Record an inspection to finish the unit.</p> : null}
          </section>
        ) : null}

        <section aria-label="Inspections">
          <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
            <h3 className="font-display text-lg font-semibold text-soot-900">Inspections</h3>
            {inspections.length ? (
              <a href={`/api/inspections/export?unit_id=${unit.id}`} download className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
                Download CSV
              </a>
            ) : null}
          </div>
          <InspectionList inspections={inspections} units={units} timeZone={timeZone} canAttach={canInspect} onChanged={() => qc.invalidateQueries({ queryKey: key })} />
        </section>
      </div>

      <section id="inspect" aria-label="New inspection" className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
        <h3 className="mb-1 font-display text-lg font-semibold text-soot-900">Record an inspection</h3>
        {canInspect && inspectable ? (
          <>
            <p className="mb-3 text-xs text-soot-500">
              Lengths in {units === "in" ? "inches" : "millimetres"}, Ra in {units === "in" ? "microinches" : "micrometres"}. Green and as-sintered sizes on the same
              feature give the realized shrinkage for the material&rsquo;s calibration.
            </p>
            <InspectionForm key={unit.version} unit={unit} units={units} onSaved={onSaved} />
          </>
        ) : (
          <p className="text-sm text-soot-500">
            {!canInspect ? "Your role does not record inspections." : `Inspections are recorded while a unit is ready for finishing or in finishing; this one is ${stateLabel(unit.state)}.`}
          </p>
        )}
      </section>
    </div>
  );
}
