"use client";

import Link from "next/link";
import { useState } from "react";
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import type { CapacityView } from "@/lib/capacity/types";
import type { CsvTable, ResourceKind } from "@/lib/capacity/schemas";
import { capacityQuerySchema } from "@/lib/capacity/schemas";
import { ApiError, getJson } from "@/components/finishing/api";
import { formatWhen, slackLabel, stateLabel } from "@/components/finishing/format";
import { QueryProvider } from "@/components/floor/query-provider";
import { RiskBadge } from "@/components/finishing/state-badge";
import { QueueChart, ThroughputChart, UtilizationChart, UtilizationTable, WipChart } from "./charts";
import { CalendarFeeds } from "./calendar-feeds";
import { ScrollRegion } from "@/components/ui/scroll-region";

export type CapacityBoardProps = { initialRange: { from: string; to: string }; today: string };

export function CapacityBoard(props: CapacityBoardProps) {
  return (
    <QueryProvider>
      <Inner {...props} />
    </QueryProvider>
  );
}

const KIND_TITLE: Record<ResourceKind, string> = { printer: "Printers", wash_station: "Wash stations", furnace: "Furnaces" };

function addDays(date: string, days: number) {
  const d = new Date(`${date}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

function CsvLink({ range, table, label = "CSV" }: { range: { from: string; to: string }; table: CsvTable; label?: string }) {
  return (
    <a
      href={`/api/capacity/export?from=${range.from}&to=${range.to}&table=${table}`}
      download
      className="tap-target inline-flex items-center justify-center rounded border border-soot-300 px-2 py-0.5 text-xs font-semibold text-soot-600 hover:border-clay-400 hover:text-clay-700"
      data-testid={`csv-${table}`}
    >
      {label}
    </a>
  );
}

function Panel({ title, actions, children, testId }: { title: string; actions?: React.ReactNode; children: React.ReactNode; testId: string }) {
  return (
    <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label={title} data-testid={testId}>
      <div className="mb-2 flex flex-wrap items-center justify-between gap-2">
        <h2 className="font-display text-lg font-semibold text-soot-900">{title}</h2>
        {actions ? <div className="flex items-center gap-2">{actions}</div> : null}
      </div>
      {children}
    </section>
  );
}

function Inner({ initialRange, today }: CapacityBoardProps) {
  const [range, setRange] = useState(initialRange);
  const [draft, setDraft] = useState(initialRange);
  const [rangeError, setRangeError] = useState<string | null>(null);
  const [period, setPeriod] = useState<"day" | "week">("day");
  const view = useQuery({
    queryKey: ["capacity", range.from, range.to],
    queryFn: () => getJson<CapacityView>(`/api/capacity?from=${range.from}&to=${range.to}`),
    placeholderData: keepPreviousData,
    refetchInterval: 60_000,
  });

  const submit = (next: { from: string; to: string }) => {
    const parsed = capacityQuerySchema.safeParse(next);
    if (!parsed.success) {
      setRangeError(parsed.error.issues[0].message);
      return;
    }
    setRangeError(null);
    setDraft(next);
    setRange(next);
  };
  const presets: Array<{ label: string; from: string; to: string }> = [
    { label: "2 weeks back, 2 ahead", from: addDays(today, -13), to: addDays(today, 14) },
    { label: "Last 4 weeks", from: addDays(today, -27), to: today },
    { label: "Next 4 weeks", from: today, to: addDays(today, 27) },
  ];

  const v = view.data;
  const late = v?.orders.filter((o) => o.status !== "on_time") ?? [];
  const onTime = v ? v.orders.length - late.length : 0;

  return (
    <div className="space-y-5">
      <form
        className="flex flex-wrap items-end gap-3 rounded-card border border-soot-200 bg-white px-4 py-3"
        onSubmit={(e) => {
          e.preventDefault();
          submit(draft);
        }}
        aria-label="Date range"
      >
        <label className="text-xs font-semibold text-soot-600">
          From
          <input type="date" value={draft.from} onChange={(e) => setDraft({ ...draft, from: e.target.value })} className="mt-1 block rounded-md border border-soot-300 px-2 py-1 text-sm" aria-label="From" />
        </label>
        <label className="text-xs font-semibold text-soot-600">
          To (included)
          <input type="date" value={draft.to} onChange={(e) => setDraft({ ...draft, to: e.target.value })} className="mt-1 block rounded-md border border-soot-300 px-2 py-1 text-sm" aria-label="To" />
        </label>
        <button type="submit" className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700">Show</button>
        <div className="flex flex-wrap gap-1">
          {presets.map((p) => (
            <button key={p.label} type="button" onClick={() => submit({ from: p.from, to: p.to })} className="rounded-full border border-soot-200 px-2.5 py-1 text-xs text-soot-600 hover:border-clay-300">
              {p.label}
            </button>
          ))}
        </div>
        {view.isFetching ? <span className="text-xs text-soot-500" role="status">Updating…</span> : null}
        {rangeError ? <span role="alert" className="text-xs text-oxide-700">{rangeError}</span> : null}
        {v ? <span className="ml-auto text-xs text-soot-500">Days and weeks in {v.time_zone.replaceAll("_", " ")} · as of {formatWhen(v.now, v.time_zone)}</span> : null}
      </form>

      {view.isError ? <p role="alert" className="text-sm text-oxide-700">{view.error instanceof ApiError ? view.error.message : "The capacity figures could not be loaded."}</p> : null}
      {!v ? (
        view.isPending ? <p className="text-sm text-soot-500">Loading the figures…</p> : null
      ) : (
        <>
          <Panel
            title="Late and at-risk orders"
            testId="orders-at-risk"
            actions={<><span className="text-xs text-soot-500">{onTime} open orders on time · at risk means less than {Math.round(v.at_risk_margin_minutes / 60)} h to spare</span><CsvLink range={range} table="orders" /></>}
          >
            {late.length ? (
              <ScrollRegion label="Late and at-risk orders">
                <table className="tabular w-full text-sm">
                  <thead className="text-left text-2xs uppercase tracking-wide text-soot-500">
                    <tr>
                      <th className="py-1 pr-3">Order</th>
                      <th className="py-1 pr-3">Customer</th>
                      <th className="py-1 pr-3">Priority</th>
                      <th className="py-1 pr-3">Due</th>
                      <th className="py-1 pr-3">Projected completion</th>
                      <th className="py-1 pr-3">Status</th>
                      <th className="py-1 pr-3">Units</th>
                      <th className="py-1">Last to finish</th>
                    </tr>
                  </thead>
                  <tbody>
                    {late.map((o) => (
                      <tr key={o.id} className="border-t border-soot-100" data-order={o.code}>
                        <td className="py-1.5 pr-3 font-semibold">{o.code}</td>
                        <td className="py-1.5 pr-3">{o.customer}</td>
                        <td className="py-1.5 pr-3">{o.priority}</td>
                        <td className="py-1.5 pr-3">{formatWhen(o.due_at, v.time_zone)}</td>
                        <td className="py-1.5 pr-3">
                          {formatWhen(o.projected_end, v.time_zone)}
                          <div className="text-2xs text-soot-500">{slackLabel(o.slack_minutes)}</div>
                        </td>
                        <td className="py-1.5 pr-3"><RiskBadge status={o.status} /></td>
                        <td className="py-1.5 pr-3 text-xs">
                          {o.units_done}/{o.units_total} done{o.units_scrapped ? `, ${o.units_scrapped} scrapped` : ""}
                        </td>
                        <td className="py-1.5 text-xs">
                          {o.latest_unit_id ? <Link href={`/units/${o.latest_unit_id}`} className="tap-target inline-flex items-center font-mono text-clay-700 hover:underline">{o.latest_serial}</Link> : o.latest_serial}
                          <span className="text-soot-500"> · {stateLabel(o.latest_state)}</span>
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </ScrollRegion>
            ) : (
              <p className="text-sm text-verdigris-700">Every open order is projected to finish with more than the margin to spare.</p>
            )}
          </Panel>

          <Panel
            title="Utilization"
            testId="utilization"
            actions={
              <>
                <div role="radiogroup" aria-label="Period" className="flex overflow-hidden rounded-md border border-soot-300 text-xs">
                  {(["day", "week"] as const).map((p) => (
                    <button key={p} type="button" role="radio" aria-checked={period === p} onClick={() => setPeriod(p)} className={`px-2.5 py-1 ${period === p ? "bg-soot-800 text-white" : "bg-white text-soot-600"}`}>
                      per {p}
                    </button>
                  ))}
                </div>
                <CsvLink range={range} table={period === "day" ? "utilization-day" : "utilization-week"} />
              </>
            }
          >
            <p className="mb-3 text-xs text-soot-500">Booked hours over available hours (the period less maintenance). Ahead of today it is the load already booked.</p>
            <div className="grid grid-cols-1 gap-5 xl:grid-cols-3">
              {(["printer", "wash_station", "furnace"] as const).map((kind) => {
                const rows = v.utilization[period].resources.filter((r) => r.kind === kind);
                const pooled = v.utilization[period].kinds.find((k) => k.kind === kind);
                return (
                  <div key={kind} data-testid={`utilization-${kind}`}>
                    <h3 className="text-sm font-semibold text-soot-800">{KIND_TITLE[kind]}</h3>
                    <UtilizationChart rows={rows} kind={pooled} period={period} today={today} />
                    <UtilizationTable rows={rows} kind={pooled} />
                  </div>
                );
              })}
            </div>
          </Panel>

          <div className="grid grid-cols-1 gap-5 xl:grid-cols-2">
            <Panel title="Booked work ahead" testId="queue" actions={<CsvLink range={range} table="queue" />}>
              <QueueChart rows={v.queue} />
              <ul className="mt-2 space-y-0.5 text-xs text-soot-600">
                {v.backlog.map((b) => (
                  <li key={b.kind}>
                    <span className="font-semibold">{KIND_TITLE[b.kind]}:</span> {b.count} {b.what}
                    {b.hours !== null && b.count ? ` (${b.hours.toFixed(1)} h estimated)` : ""}
                  </li>
                ))}
              </ul>
            </Panel>
            <Panel title="Work in progress" testId="wip" actions={<CsvLink range={range} table="wip" />}>
              <WipChart rows={v.wip} />
              <p className="text-xs text-soot-500">{v.wip.reduce((a, w) => a + w.count, 0)} units in progress, by state, now.</p>
            </Panel>
          </div>

          <div className="grid grid-cols-1 gap-5 xl:grid-cols-2">
            <Panel title="Throughput per week" testId="throughput" actions={<CsvLink range={range} table="throughput" />}>
              <ThroughputChart rows={v.throughput} />
              <p className="text-xs text-soot-500">Units that came out of a furnace run sintered, and units finished, in each week of the range.</p>
            </Panel>
            <CalendarFeeds resources={v.resources} />
          </div>
        </>
      )}
    </div>
  );
}
