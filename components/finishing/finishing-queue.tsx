"use client";

import Link from "next/link";
import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { UnitSystem } from "@/lib/units";
import type { FinishingAction } from "@/lib/finishing/schemas";
import type { FinishingCard, FinishingQueue as Queue } from "@/lib/finishing/types";
import { ApiError, getJson, sendJson } from "./api";
import { formatWhen, ra, relative, stateLabel, stockLen } from "./format";
import { QueryProvider } from "@/components/floor/query-provider";
import { StateBadge } from "./state-badge";
import { ToleranceText, UnitFacts } from "./unit-facts";
import { ScrollRegion } from "@/components/ui/scroll-region";

export type FinishingQueueProps = { canWrite: boolean; units: UnitSystem; timeZone: string };

export function FinishingQueue(props: FinishingQueueProps) {
  return (
    <QueryProvider>
      <QueueInner {...props} />
    </QueryProvider>
  );
}

type Flash = { tone: "danger" | "success"; text: string } | null;

function QueueInner({ canWrite, units, timeZone }: FinishingQueueProps) {
  const qc = useQueryClient();
  const [flash, setFlash] = useState<Flash>(null);
  const queue = useQuery({ queryKey: ["finishing"], queryFn: () => getJson<Queue>("/api/finishing"), refetchInterval: 30_000 });
  const act = useMutation({
    mutationFn: (v: { unit: FinishingCard; action: FinishingAction; reason?: string }) =>
      sendJson<{ unit: FinishingCard }>(`/api/finishing/${v.unit.id}`, "POST", { action: v.action, version: v.unit.version, reason: v.reason }),
    onSuccess: (res, v) => {
      setFlash({ tone: "success", text: `${v.unit.serial}: now ${stateLabel(res.unit.state)}.` });
      qc.invalidateQueries({ queryKey: ["finishing"] });
    },
    onError: (err, v) => {
      setFlash({ tone: "danger", text: `${v.unit.serial}: ${err instanceof ApiError ? err.message : "the change did not go through"}` });
      qc.invalidateQueries({ queryKey: ["finishing"] });
    },
  });

  if (queue.isPending) return <p className="text-sm text-soot-500">Loading the queue…</p>;
  if (queue.isError) return <p className="text-sm text-oxide-700">The queue could not be loaded: {queue.error.message}</p>;
  const q = queue.data;
  const cardProps = { units, timeZone, canWrite, busy: act.isPending, onAction: (unit: FinishingCard, action: FinishingAction, reason?: string) => act.mutate({ unit, action, reason }) };

  return (
    <div className="space-y-6">
      {flash ? (
        <div role={flash.tone === "danger" ? "alert" : "status"} className={`rounded-card border px-4 py-2 text-sm ${flash.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700"}`}>
          {flash.text}
        </div>
      ) : null}

      <Section title="Arriving" count={q.arriving.length} hint="Units in a furnace run, with the time the run ends and they come out." testId="arriving">
        {q.arriving.length ? <ArrivingTable cards={q.arriving} units={units} timeZone={timeZone} now={q.now} /> : <Empty>Nothing is on its way from the furnaces.</Empty>}
      </Section>

      <Section title="Ready for finishing" count={q.ready.length} hint="Out of the furnace and released: accept a unit to start on it." testId="ready">
        <CardGrid cards={q.ready} {...cardProps} empty="No unit is waiting." />
      </Section>

      <Section title="In finishing" count={q.finishing.length} hint="Record an inspection; a unit is finished once an inspection has passed." testId="in-finishing">
        <CardGrid cards={q.finishing} {...cardProps} empty="No unit is being finished." />
      </Section>

      {q.held.length ? (
        <Section title="On hold" count={q.held.length} hint="Held from finishing, with the reason." testId="held">
          <CardGrid cards={q.held} {...cardProps} empty="" />
        </Section>
      ) : null}

      <Section title="Finished or scrapped this week" count={q.recent.length} testId="recent">
        {q.recent.length ? (
          <ul className="divide-y divide-soot-100 rounded-card border border-soot-200 bg-white text-sm">
            {q.recent.map((c) => (
              <li key={c.id} className="flex flex-wrap items-center gap-x-4 gap-y-1 px-4 py-2">
                <Link href={`/units/${c.id}`} className="tap-target inline-flex items-center font-mono text-xs font-semibold text-clay-700 hover:underline">{c.serial}</Link>
                <StateBadge state={c.state} />
                <span className="text-soot-600">{c.part.part_number} rev {c.part.revision} · {c.part.name}</span>
                {c.scrap_note ? <span className="text-oxide-700">{c.scrap_note}</span> : null}
                <span className="ml-auto text-xs text-soot-500">{formatWhen(c.state_changed_at, timeZone)}</span>
              </li>
            ))}
          </ul>
        ) : (
          <Empty>Nothing finished in the last seven days.</Empty>
        )}
      </Section>
    </div>
  );
}

function Section({ title, count, hint, testId, children }: { title: string; count: number; hint?: string; testId: string; children: React.ReactNode }) {
  return (
    <section aria-label={title} data-testid={`section-${testId}`}>
      <div className="mb-2 flex flex-wrap items-baseline gap-x-3">
        <h2 className="font-display text-lg font-semibold text-soot-900">
          {title} <span className="font-sans text-sm font-normal text-soot-500">({count})</span>
        </h2>
        {hint ? <p className="text-xs text-soot-500">{hint}</p> : null}
      </div>
      {children}
    </section>
  );
}

const Empty = ({ children }: { children: React.ReactNode }) => <p className="rounded-card border border-dashed border-soot-200 px-4 py-3 text-sm text-soot-500">{children}</p>;

function ArrivingTable({ cards, units, timeZone, now }: { cards: FinishingCard[]; units: UnitSystem; timeZone: string; now: string }) {
  return (
    <ScrollRegion label="Finishing queue" className="rounded-card border border-soot-200 bg-white">
      <table className="tabular w-full text-sm">
        <thead className="bg-soot-50 text-left text-2xs uppercase tracking-wide text-soot-500">
          <tr>
            <th className="px-3 py-2">Unit</th>
            <th className="px-3 py-2">Part</th>
            <th className="px-3 py-2">Material</th>
            <th className="px-3 py-2">Furnace run</th>
            <th className="px-3 py-2">Comes out</th>
            <th className="whitespace-nowrap px-3 py-2">Stock − / +</th>
            <th className="px-3 py-2">Tolerance · Ra · notes</th>
            <th className="px-3 py-2">Order due</th>
          </tr>
        </thead>
        <tbody>
          {cards.map((c) => {
            const out = c.projected_arrival;
            const past = out ? new Date(out).getTime() <= new Date(now).getTime() : false;
            return (
              <tr key={c.id} className="border-t border-soot-100 align-top" data-serial={c.serial}>
                <td className="px-3 py-2">
                  <Link href={`/units/${c.id}`} className="tap-target inline-flex items-center whitespace-nowrap font-mono text-xs font-semibold text-clay-700 hover:underline">{c.serial}</Link>
                  <div className="mt-0.5"><StateBadge state={c.state} /></div>
                </td>
                <td className="px-3 py-2">
                  <span className="whitespace-nowrap">{c.part.part_number} rev {c.part.revision}</span>
                  <div className="text-xs text-soot-500">{c.part.name}</div>
                </td>
                <td className="px-3 py-2">{c.material.code}</td>
                <td className="px-3 py-2">
                  <Link href={`/furnace-runs/${c.furnace_run!.id}`} className="tap-target inline-flex items-center hover:underline">{c.furnace_run!.code}</Link>
                  <div className="text-xs text-soot-500">{c.furnace_run!.furnace_name ?? "no furnace"} · {c.furnace_run!.state}</div>
                </td>
                <td className="px-3 py-2">
                  {formatWhen(out, timeZone)}
                  <div className={`text-xs ${past ? "text-brass-600" : "text-soot-500"}`}>{out ? (past ? "out of the furnace, awaiting release" : relative(out, new Date(now).getTime())) : ""}</div>
                </td>
                <td className="whitespace-nowrap px-3 py-2 text-xs">
                  {(["x", "y", "z"] as const).map((a) => (
                    <div key={a}>
                      <span className="font-semibold">{a.toUpperCase()}</span> {stockLen(c.part[`stock_${a}_neg_mm`], units)} / {stockLen(c.part[`stock_${a}_pos_mm`], units)}
                    </div>
                  ))}
                </td>
                <td className="px-3 py-2 text-xs">
                  <ToleranceText unit={c} />
                  <div>Ra {ra(c.part.target_ra_um, units)}</div>
                  <div className="text-soot-500">{c.part.finishing_notes}</div>
                </td>
                <td className="px-3 py-2 text-xs">{c.order.code} · {formatWhen(c.order.due_at, timeZone)}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </ScrollRegion>
  );
}

type CardGridProps = {
  cards: FinishingCard[];
  units: UnitSystem;
  timeZone: string;
  canWrite: boolean;
  busy: boolean;
  empty: string;
  onAction: (unit: FinishingCard, action: FinishingAction, reason?: string) => void;
};

function CardGrid({ cards, empty, ...rest }: CardGridProps) {
  if (!cards.length) return <Empty>{empty}</Empty>;
  return (
    <div className="grid grid-cols-1 gap-3 xl:grid-cols-2">
      {cards.map((c) => (
        <UnitCard key={c.id} card={c} {...rest} />
      ))}
    </div>
  );
}

function UnitCard({ card, units, timeZone, canWrite, busy, onAction }: Omit<CardGridProps, "cards" | "empty"> & { card: FinishingCard }) {
  const [holding, setHolding] = useState(false);
  const [reason, setReason] = useState("");
  const latest = card.latest_inspection;
  return (
    <article className="rounded-card border border-soot-200 bg-white p-4 shadow-card" data-testid="finishing-card" data-serial={card.serial}>
      <header className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <div className="flex items-center gap-2">
            <Link href={`/finishing/${card.id}`} className="tap-target inline-flex items-center font-mono text-sm font-semibold text-clay-700 hover:underline">{card.serial}</Link>
            <StateBadge state={card.state} />
          </div>
          <div className="mt-0.5 text-sm text-soot-800">
            {card.part.part_number} rev {card.part.revision} · {card.part.name} · <span className="font-semibold">{card.material.code}</span>
          </div>
          <div className="text-xs text-soot-500">
            {card.order.code} for {card.order.customer} · due {formatWhen(card.order.due_at, timeZone)}
          </div>
        </div>
        <div className="flex flex-col items-end gap-1 text-xs">
          {card.build ? (
            <span>
              <a href={`/api/builds/${card.build.id}/traveler`} target="_blank" rel="noreferrer" className="tap-target inline-flex items-center text-clay-700 hover:underline">Traveler</a>
              {" · "}
              <Link href={`/builds/${card.build.id}`} className="tap-target inline-flex items-center text-clay-700 hover:underline">build {card.build.code}</Link>
            </span>
          ) : null}
          <Link href={`/units/${card.id}`} className="tap-target inline-flex items-center text-clay-700 hover:underline">Trace</Link>
        </div>
      </header>
      <div className="mt-3">
        <UnitFacts unit={card} units={units} compact />
      </div>
      {card.hold_reason ? <p className="mt-2 text-xs text-brass-600">On hold: {card.hold_reason}</p> : null}
      {latest ? (
        <p className={`mt-2 text-xs ${latest.passed ? "text-verdigris-700" : "text-oxide-700"}`}>
          Last inspection {latest.passed ? "passed" : `failed: ${latest.reason}`} · {formatWhen(latest.created_at, timeZone)}
        </p>
      ) : null}
      {canWrite ? (
        <footer className="mt-3 flex flex-wrap items-center gap-2">
          {card.actions.includes("accept") ? (
            <button type="button" disabled={busy} onClick={() => onAction(card, "accept")} className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
              Accept
            </button>
          ) : null}
          {card.state === "finishing" ? (
            <Link href={`/finishing/${card.id}#inspect`} className="tap-target inline-flex items-center rounded-md border border-clay-500 px-3 py-1.5 text-sm font-semibold text-clay-700 hover:bg-clay-50">
              Inspect
            </Link>
          ) : null}
          {card.actions.includes("finish") ? (
            <button type="button" disabled={busy} onClick={() => onAction(card, "finish")} className="rounded-md bg-verdigris-500 px-3 py-1.5 text-sm font-semibold text-white hover:bg-verdigris-700 disabled:opacity-50">
              Mark finished
            </button>
          ) : null}
          {card.actions.includes("scrap") ? (
            <Link href={`/finishing/${card.id}`} className="tap-target inline-flex items-center rounded-md border border-oxide-500/50 px-3 py-1.5 text-sm font-semibold text-oxide-700 hover:bg-oxide-100">
              Scrap or hold…
            </Link>
          ) : null}
          {card.actions.includes("release") ? (
            <button type="button" disabled={busy} onClick={() => onAction(card, "release")} className="rounded-md border border-soot-300 px-3 py-1.5 text-sm font-semibold text-soot-700 hover:bg-soot-50 disabled:opacity-50">
              Release
            </button>
          ) : null}
          {card.actions.includes("hold") && !holding ? (
            <button type="button" onClick={() => setHolding(true)} className="ml-auto text-xs font-semibold text-soot-500 hover:text-soot-800">
              Put on hold
            </button>
          ) : null}
          {holding ? (
            <form
              className="flex w-full flex-wrap items-center gap-2"
              onSubmit={(e) => {
                e.preventDefault();
                if (reason.trim()) onAction(card, "hold", reason.trim());
              }}
            >
              <label className="sr-only" htmlFor={`hold-${card.id}`}>Reason for the hold</label>
              <input id={`hold-${card.id}`} value={reason} onChange={(e) => setReason(e.target.value)} placeholder="Why is it held?" className="min-w-0 flex-1 rounded-md border border-soot-300 px-2 py-1 text-sm" />
              <button type="submit" disabled={!reason.trim() || busy} className="rounded-md bg-brass-600 px-3 py-1 text-sm font-semibold text-white disabled:opacity-50">Hold</button>
              <button type="button" onClick={() => setHolding(false)} className="text-xs text-soot-500">Cancel</button>
            </form>
          ) : null}
        </footer>
      ) : null}
    </article>
  );
}
