"use client";

import Link from "next/link";
import { useQuery } from "@tanstack/react-query";
import { formatDuration, formatLength, formatMass, type UnitSystem } from "@/lib/units";
import type { TimelineEntry, UnitTrace as Trace } from "@/lib/finishing/types";
import { getJson } from "@/components/finishing/api";
import { formatWhen } from "@/components/finishing/format";
import { InspectionList } from "@/components/finishing/inspection-list";
import { QueryProvider } from "@/components/floor/query-provider";
import { StateBadge } from "@/components/finishing/state-badge";
import { LiveIndicator, useLivePoll } from "@/components/live/live-updates";
import { NextStepCard } from "@/components/scan/next-step-card";
import type { Role } from "@/lib/auth/permissions";
import { unitNextStep } from "@/lib/scan/next-step";

// Where a unit came from and what happened to it: lot and build, wash and masses, furnace run
// and profile, inspections, and every event of the unit and its bookings on one timeline.

export type UnitTraceProps = {
  unitId: string; units: UnitSystem; timeZone: string; canAttach: boolean; role: Role;
  /** The history as the server read it for the page's HTML; refreshed through the API after. */
  initial?: Trace;
};

export function UnitTrace(props: UnitTraceProps) {
  return (
    <QueryProvider>
      <Inner {...props} />
    </QueryProvider>
  );
}

const SOURCE: Record<TimelineEntry["source"], { label: string; dot: string }> = {
  unit: { label: "unit", dot: "bg-clay-500" },
  build: { label: "build", dot: "bg-slate2-400" },
  wash_batch: { label: "wash", dot: "bg-verdigris-400" },
  furnace_run: { label: "furnace", dot: "bg-ember-500" },
  inspection: { label: "inspection", dot: "bg-brass-400" },
};

function Card({ title, children, testId }: { title: string; children: React.ReactNode; testId: string }) {
  return (
    <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label={title} data-testid={testId}>
      <h2 className="mb-2 text-sm font-semibold uppercase tracking-wide text-soot-500">{title}</h2>
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">{children}</dl>
    </section>
  );
}
const Row = ({ k, children }: { k: string; children: React.ReactNode }) => (
  <>
    <dt className="text-soot-500">{k}</dt>
    <dd className="text-soot-900">{children}</dd>
  </>
);

function Inner({ unitId, units, timeZone, canAttach, role, initial }: UnitTraceProps) {
  const poll = useLivePoll();
  const trace = useQuery({ queryKey: ["trace", unitId], queryFn: () => getJson<Trace>(`/api/units/${unitId}/trace`), initialData: initial, refetchInterval: poll(10_000) });
  if (trace.isPending) return <p className="text-sm text-soot-500">Loading the unit&rsquo;s history…</p>;
  if (trace.isError) return <p className="text-sm text-oxide-700">{trace.error.message}</p>;
  const t = trace.data;
  const when = (at: string | null) => formatWhen(at, timeZone);
  const slot = (a: string | null, b: string | null) => (a && b ? `${when(a)} → ${when(b)}` : "not booked");
  const mass = (g: number | null) => (g === null ? "–" : formatMass(g, units));
  const size = (v: { x: number | null; y: number | null; z: number | null }) =>
    (["x", "y", "z"] as const).map((a) => (v[a] === null ? "–" : formatLength(v[a]!, units))).join(" × ");

  return (
    <div className="space-y-6">
      <NextStepCard
        title={t.unit.serial}
        subtitle={`${t.part.part_number} rev ${t.part.revision} · ${t.part.name} · ${t.material.code} · order ${t.order.code}`}
        step={unitNextStep(role, { ...t.unit, latest_inspection_passed: t.inspections[0]?.passed ?? null }, t.build, t.wash, t.furnace_run)}
        onDone={() => void trace.refetch()}
      />
      <header className="flex flex-wrap items-center gap-3">
        <h2 className="font-mono text-xl font-semibold text-soot-900" data-testid="trace-serial">{t.unit.serial}</h2>
        <StateBadge state={t.unit.state} />
        <span className="text-sm text-soot-600">
          {t.part.part_number} rev {t.part.revision} · {t.part.name} · order{" "}
          <span className="font-semibold">{t.order.code}</span> for {t.order.customer}, due {when(t.order.due_at)}
        </span>
        {t.unit.hold_reason ? <span className="text-sm text-brass-600">On hold: {t.unit.hold_reason}</span> : null}
        {t.unit.scrap_reason ? <span className="text-sm text-oxide-700">Scrapped ({t.unit.scrap_reason.replaceAll("_", " ")}): {t.unit.scrap_note}</span> : null}
        <LiveIndicator />
        {["ready_for_finishing", "finishing"].includes(t.unit.state) ? (
          <Link href={`/finishing/${t.unit.id}`} className="tap-target ml-auto inline-flex items-center text-sm font-semibold text-clay-700 hover:underline">Open in finishing</Link>
        ) : null}
      </header>

      <div className="grid grid-cols-1 gap-4 md:grid-cols-2 2xl:grid-cols-4">
        <Card title="Material and print" testId="trace-build">
          <Row k="Material">{t.material.name} ({t.material.code})</Row>
          <Row k="Feedstock lot">
            {t.build?.feedstock_lots.length
              ? t.build.feedstock_lots.map((l, i) => (
                  <span key={l.id}>
                    {i ? ", " : ""}
                    <Link href={`/inventory/${l.id}`} className="tap-target inline-flex items-center font-mono text-clay-700 hover:underline">{l.code}</Link> ({l.supplier} {l.supplier_lot})
                  </span>
                ))
              : t.build?.material_lot || "not recorded"}
          </Row>
          <Row k="Build">{t.build ? <Link href={`/builds/${t.build.id}`} className="tap-target inline-flex items-center text-clay-700 hover:underline">{t.build.code}</Link> : "not in a build yet"}</Row>
          {t.build ? (
            <>
              <Row k="Printer">{t.build.printer_name ?? "none"}</Row>
              <Row k="Booked">{slot(t.build.starts_at, t.build.ends_at)}</Row>
              <Row k="Printed">{t.build.started_at ? `${when(t.build.started_at)} → ${when(t.build.finished_at)}` : "–"}</Row>
              {t.build.failed ? <Row k="Failed">{t.build.failure_reason ?? "yes"}</Row> : null}
              <Row k="Traveler"><a href={`/api/builds/${t.build.id}/traveler`} target="_blank" rel="noreferrer" className="tap-target inline-flex items-center text-clay-700 hover:underline">traveler (PDF)</a></Row>
            </>
          ) : null}
          <Row k="Finished size">{size(t.part.nominal)}</Row>
          <Row k="Green size">{size(t.part.green)}</Row>
        </Card>

        <Card title="Wash" testId="trace-wash">
          {t.wash ? (
            <>
              <Row k="Batch">{t.wash.code} · {t.wash.state}</Row>
              <Row k="Station">{t.wash.station_name ?? "none"}{t.wash.solvent ? ` (${t.wash.solvent})` : ""}</Row>
              <Row k="Booked">{slot(t.wash.starts_at, t.wash.ends_at)}</Row>
              {t.wash.est_minutes ? <Row k="Duration">{formatDuration(t.wash.est_minutes)}</Row> : null}
            </>
          ) : (
            <Row k="Batch">not washed yet</Row>
          )}
          <Row k="Green mass">{mass(t.unit.green_mass_g)}</Row>
          <Row k="Brown mass">{mass(t.unit.brown_mass_g)}</Row>
          <Row k="Sintered mass">{mass(t.unit.sintered_mass_g)}</Row>
          {t.wash?.mass_loss ? (
            <Row k="Mass loss">
              <span className={t.wash.mass_loss.passed ? "text-verdigris-700" : "text-oxide-700"} data-testid="mass-loss">
                {(t.wash.mass_loss.lossFraction * 100).toFixed(2)} % (minimum {(t.material.min_mass_loss * 100).toFixed(1)} %) · {t.wash.mass_loss.passed ? "passed" : "short"}
              </span>
            </Row>
          ) : null}
        </Card>

        <Card title="Sinter" testId="trace-furnace">
          {t.furnace_run ? (
            <>
              <Row k="Run"><Link href={`/furnace-runs/${t.furnace_run.id}`} className="tap-target inline-flex items-center text-clay-700 hover:underline">{t.furnace_run.code}</Link> · {t.furnace_run.state}</Row>
              <Row k="Furnace">{t.furnace_run.furnace_name ?? "none"}</Row>
              <Row k="Profile">{t.furnace_run.profile.code} rev {t.furnace_run.profile.revision} · {t.furnace_run.profile.name}</Row>
              <Row k="Atmosphere">{t.furnace_run.profile.atmosphere}</Row>
              <Row k="Segments">
                <ol className="text-xs">
                  {t.furnace_run.profile.segments.map((s, i) => (
                    <li key={i}>
                      {s.rate_c_per_min} °C/min to {s.setpoint_c} °C{s.hold_min ? `, hold ${s.hold_min} min` : ""}
                    </li>
                  ))}
                </ol>
              </Row>
              {t.furnace_run.profile.cycle ? <Row k="Cycle">{formatDuration(t.furnace_run.profile.cycle.total_minutes)} · peak {t.furnace_run.profile.cycle.peak_c} °C</Row> : null}
              <Row k="Booked">{slot(t.furnace_run.starts_at, t.furnace_run.ends_at)}</Row>
              <Row k="Loaded">{when(t.furnace_run.loaded_at)}</Row>
              <Row k="Unloaded">{when(t.furnace_run.unloaded_at)}</Row>
            </>
          ) : (
            <Row k="Run">not in a furnace run yet</Row>
          )}
        </Card>

        <Card title="Inspection" testId="trace-inspection">
          <Row k="Records">{t.inspections.length}</Row>
          {t.inspections[0] ? (
            <>
              <Row k="Latest">
                <span className={t.inspections[0].passed ? "text-verdigris-700" : "text-oxide-700"}>{t.inspections[0].passed ? "passed" : `failed: ${t.inspections[0].reason}`}</span>
              </Row>
              <Row k="When">{when(t.inspections[0].created_at)}</Row>
              <Row k="By">{t.inspections[0].inspector_name ?? "–"}</Row>
            </>
          ) : null}
        </Card>
      </div>

      <div className="grid grid-cols-1 gap-6 xl:grid-cols-[minmax(0,1.2fr)_minmax(0,1fr)]">
        <section aria-label="Timeline">
          <h2 className="mb-3 font-display text-lg font-semibold text-soot-900">Timeline</h2>
          <ol className="relative space-y-3 border-l border-soot-200 pl-5" data-testid="trace-timeline">
            {t.timeline.map((e, i) => (
              <li key={`${e.at}-${i}`} className="relative" data-source={e.source}>
                <span className={`absolute -left-[1.6rem] top-1.5 h-2.5 w-2.5 rounded-full ring-2 ring-white ${SOURCE[e.source].dot}`} aria-hidden />
                <div className="flex flex-wrap items-baseline gap-x-2 text-sm">
                  <span className="tabular text-xs text-soot-500">{when(e.at)}</span>
                  <span className="rounded bg-soot-100 px-1.5 text-2xs uppercase tracking-wide text-soot-600">{SOURCE[e.source].label}</span>
                  <span className="font-semibold text-soot-900">{e.title}</span>
                  {e.actor ? <span className="text-xs text-soot-500">· {e.actor}</span> : null}
                </div>
                {e.detail ? <p className="text-xs text-soot-600">{e.detail}</p> : null}
              </li>
            ))}
          </ol>
        </section>
        <section aria-label="Inspections">
          <h2 className="mb-3 font-display text-lg font-semibold text-soot-900">Inspections</h2>
          <InspectionList inspections={t.inspections} units={units} timeZone={timeZone} canAttach={canAttach} onChanged={() => trace.refetch()} />
        </section>
      </div>
    </div>
  );
}
