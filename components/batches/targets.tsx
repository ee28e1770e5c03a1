"use client";

import Link from "next/link";
import { useState } from "react";
import { useDroppable } from "@dnd-kit/core";
import { furnaceGauges, washGauges, washMinutesOf } from "@/lib/batches/rules";
import type { BoardFurnace, BoardFurnaceRun, BoardProfile, BoardStation, BoardUnit, BoardWashBatch } from "@/lib/batches/types";
import type { TrayRun } from "@/lib/packing/types";
import { TrayDrawing } from "@/components/furnace/tray-drawing";
import { BookingForm } from "./booking-form";
import { duration, shopTime } from "./format";
import { GaugeBar } from "./gauge";
import { UnitCard } from "./unit-card";

export type HoverVerdict = { targetId: string; ok: true; layout?: TrayRun; unit: BoardUnit } | { targetId: string; ok: false; reason: string; unit: BoardUnit };

const STATE_WORDS: Record<string, string> = { draft: "Draft", scheduled: "Booked", running: "Running", complete: "Complete", cancelled: "Cancelled" };

function DropFrame({ id, hover, children, testId, label, version }: { id: string; hover: HoverVerdict | null; children: React.ReactNode; testId: string; label: string; version: number }) {
  const { setNodeRef, isOver } = useDroppable({ id });
  const mine = hover && hover.targetId === id ? hover : null;
  const ring = mine ? (mine.ok ? "border-verdigris-500 ring-2 ring-verdigris-400/40" : "border-oxide-500 ring-2 ring-oxide-500/30") : isOver ? "border-clay-400" : "border-soot-200";
  return (
    <section ref={setNodeRef} data-testid={testId} data-target-id={id} data-version={version} aria-label={label} className={`rounded-card border bg-white p-3 shadow-card transition-colors ${ring}`}>
      {children}
      {mine ? (
        <p role="status" className={`mt-2 rounded px-2 py-1 text-xs font-medium ${mine.ok ? "bg-verdigris-100 text-verdigris-700" : "bg-oxide-100 text-oxide-700"}`} data-testid="drop-verdict">
          {mine.ok ? `${mine.unit.serial} fits here.` : `Refused: ${mine.reason}`}
        </p>
      ) : null}
    </section>
  );
}

export type RunTargetProps = {
  run: BoardFurnaceRun;
  furnace: BoardFurnace | undefined;
  furnaces: BoardFurnace[];
  profile: BoardProfile | undefined;
  clearance_mm: number;
  timeZone: string;
  unitPref: "mm" | "in";
  hover: HoverVerdict | null;
  canEdit: boolean;
  busy: boolean;
  now: string;
  onRemove: (unit: BoardUnit) => void;
  onSchedule: (startsAt: string, furnaceId: string) => void;
  onCancel: () => void;
};

export function RunTarget({ run, furnace, furnaces, profile, clearance_mm, timeZone, unitPref, hover, canEdit, busy, now, onRemove, onSchedule, onCancel }: RunTargetProps) {
  const [booking, setBooking] = useState(false);
  const id = `run:${run.id}`;
  const mine = hover && hover.targetId === id ? hover : null;
  const labels = Object.fromEntries([...run.units, ...(mine ? [mine.unit] : [])].map((u) => [u.id, u.serial]));
  const previewLayout = mine?.ok && mine.layout ? mine.layout : null;
  const gauges = furnace ? furnaceGauges(run.tray_layout, run.units, furnace) : [];
  const previewGauges = furnace && previewLayout && mine ? furnaceGauges(previewLayout, [...run.units, mine.unit], furnace) : null;
  return (
    <DropFrame id={id} hover={hover} testId="run-target" label={`Furnace run ${run.code}`} version={run.version}>
      <header className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <div className="flex items-center gap-2">
            <Link href={`/furnace-runs/${run.id}`} className="tap-target inline-flex items-center font-display text-base font-semibold text-soot-900 hover:text-clay-700">
              {run.code}
            </Link>
            <span className="rounded bg-soot-100 px-1.5 text-2xs font-semibold text-soot-700" data-testid="run-state">
              {STATE_WORDS[run.state]}
            </span>
          </div>
          <div className="text-xs text-soot-600">
            {furnace?.name ?? "no furnace"} · {profile?.label ?? "?"} · cycle {duration(run.cycle_minutes)}
          </div>
          <div className="text-2xs text-soot-500" data-testid="run-times">
            {run.starts_at ? `${shopTime(run.starts_at, timeZone)} → ${shopTime(run.ends_at, timeZone)}` : "Not booked yet"}
          </div>
        </div>
        {canEdit ? (
          <div className="flex gap-1">
            <button type="button" onClick={() => setBooking((b) => !b)} className="rounded border border-soot-200 px-2 py-0.5 text-2xs font-semibold text-soot-700 hover:bg-soot-50">
              {run.starts_at ? "Move" : "Book"}
            </button>
            <button type="button" onClick={onCancel} disabled={busy} className="rounded border border-soot-200 px-2 py-0.5 text-2xs text-soot-600 hover:bg-oxide-100 hover:text-oxide-700">
              Cancel run
            </button>
          </div>
        ) : null}
      </header>
      {booking ? (
        <BookingForm
          label="Loads at"
          timeZone={timeZone}
          initial={run.starts_at ?? now}
          resources={furnaces.filter((f) => f.profile_ids.includes(run.profile_id)).map((f) => ({ id: f.id, name: f.name }))}
          resourceId={run.furnace_id}
          busy={busy}
          onSubmit={(s, f) => {
            onSchedule(s, f);
            setBooking(false);
          }}
          onCancel={() => setBooking(false)}
        />
      ) : null}
      <div className="mt-2 grid gap-1.5" data-testid="gauges">
        {gauges.map((g) => (
          <GaugeBar key={g.key} gauge={g} preview={previewGauges?.find((p) => p.key === g.key)?.fraction ?? null} />
        ))}
      </div>
      {furnace ? (
        <div className="mt-2">
          <TrayDrawing
            layout={previewLayout ?? run.tray_layout}
            tray_x_mm={furnace.tray_x_mm}
            tray_y_mm={furnace.tray_y_mm}
            tray_count={furnace.tray_count}
            clearance_mm={clearance_mm}
            labels={labels}
            highlight={previewLayout && mine ? [mine.unit.id] : []}
            width={furnace.tray_count > 3 ? 104 : 132}
            title={`Trays of ${run.code}`}
          />
        </div>
      ) : null}
      <div className="mt-2 flex flex-wrap gap-1" data-testid="run-units">
        {run.units.length === 0 ? <p className="text-2xs text-soot-500">Empty: drop brown units here.</p> : null}
        {run.units.map((u) => (
          <UnitCard key={u.id} unit={u} from={{ kind: "run", id: run.id }} lane="furnace" timeZone={timeZone} unitPref={unitPref} compact disabled={!canEdit} onRemove={() => onRemove(u)} />
        ))}
      </div>
    </DropFrame>
  );
}

export type WashTargetProps = {
  batch: BoardWashBatch;
  station: BoardStation | undefined;
  stations: BoardStation[];
  timeZone: string;
  unitPref: "mm" | "in";
  hover: HoverVerdict | null;
  canEdit: boolean;
  busy: boolean;
  now: string;
  onRemove: (unit: BoardUnit) => void;
  onSchedule: (startsAt: string, stationId: string) => void;
  onStart: () => void;
  onCancel: () => void;
};

export function WashTarget({ batch, station, stations, timeZone, unitPref, hover, canEdit, busy, now, onRemove, onSchedule, onStart, onCancel }: WashTargetProps) {
  const [booking, setBooking] = useState(false);
  const id = `wash:${batch.id}`;
  const mine = hover && hover.targetId === id ? hover : null;
  const gauges = station ? washGauges(batch.units, station) : [];
  const preview = station && mine?.ok ? washGauges([...batch.units, mine.unit], station) : null;
  const minutes = washMinutesOf(batch.units);
  const previewMinutes = mine?.ok ? washMinutesOf([...batch.units, mine.unit]) : null;
  const slowest = batch.units.reduce<BoardUnit | null>((s, u) => (!s || u.wash_minutes > s.wash_minutes ? u : s), null);
  return (
    <DropFrame id={id} hover={hover} testId="wash-target" label={`Wash batch ${batch.code}`} version={batch.version}>
      <header className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <div className="flex items-center gap-2">
            <Link href={`/batches/wash/${batch.id}`} className="tap-target inline-flex items-center font-display text-base font-semibold text-soot-900 hover:text-clay-700">
              {batch.code}
            </Link>
            <span className="rounded bg-soot-100 px-1.5 text-2xs font-semibold text-soot-700">{STATE_WORDS[batch.state]}</span>
          </div>
          <div className="text-xs text-soot-600">
            {station?.name ?? "no station"} · wash {duration(minutes)}
            {previewMinutes !== null && minutes !== null && previewMinutes > minutes ? <span className="text-ember-600"> → {duration(previewMinutes)}</span> : null}
          </div>
          <div className="text-2xs text-soot-500">
            {batch.starts_at ? `${shopTime(batch.starts_at, timeZone)} → ${shopTime(batch.ends_at, timeZone)}` : "Not booked yet"}
            {slowest ? ` · slowest: ${slowest.serial} (wall ${slowest.thickest_wall_mm} mm)` : ""}
          </div>
        </div>
        {canEdit ? (
          <div className="flex flex-wrap gap-1">
            <button type="button" onClick={() => setBooking((b) => !b)} className="rounded border border-soot-200 px-2 py-0.5 text-2xs font-semibold text-soot-700 hover:bg-soot-50">
              {batch.starts_at ? "Move" : "Book"}
            </button>
            <button type="button" onClick={onStart} disabled={busy || batch.units.length === 0} className="rounded bg-clay-600 px-2 py-0.5 text-2xs font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
              Start now
            </button>
            <button type="button" onClick={onCancel} disabled={busy} className="rounded border border-soot-200 px-2 py-0.5 text-2xs text-soot-600 hover:bg-oxide-100 hover:text-oxide-700">
              Cancel
            </button>
          </div>
        ) : null}
      </header>
      {booking ? (
        <BookingForm
          label="Basket goes in at"
          timeZone={timeZone}
          initial={batch.starts_at ?? now}
          resources={stations.map((s) => ({ id: s.id, name: s.name }))}
          resourceId={batch.wash_station_id}
          busy={busy}
          onSubmit={(s, st) => {
            onSchedule(s, st);
            setBooking(false);
          }}
          onCancel={() => setBooking(false)}
        />
      ) : null}
      <div className="mt-2 grid gap-1.5" data-testid="gauges">
        {gauges.map((g) => (
          <GaugeBar key={g.key} gauge={g} preview={preview?.find((p) => p.key === g.key)?.fraction ?? null} />
        ))}
      </div>
      <div className="mt-2 flex flex-wrap gap-1">
        {batch.units.length === 0 ? <p className="text-2xs text-soot-500">Empty: drop green units here.</p> : null}
        {batch.units.map((u) => (
          <UnitCard key={u.id} unit={u} from={{ kind: "wash", id: batch.id }} lane="wash" timeZone={timeZone} unitPref={unitPref} compact disabled={!canEdit} onRemove={() => onRemove(u)} />
        ))}
      </div>
    </DropFrame>
  );
}
