"use client";

import { useMemo, useState } from "react";
import type { FloorEvent, FloorResource, UnscheduledBuild } from "@/lib/floor/schemas";
import { fromLocalInput, toLocalInput } from "@/components/batches/format";
import { minutesLabel } from "./format";

type Slot = { printer_id: string | null; starts_at: string | null };

export type ScheduleFormProps = {
  drafts: UnscheduledBuild[];
  scheduled: FloorEvent[];
  printers: FloorResource[];
  /** The shop's time zone: the start is typed and read as shop time. */
  timeZone: string;
  busy: boolean;
  onSubmit: (b: { build_id: string; code: string; version: number }, to: Slot, before: Slot) => Promise<boolean>;
};

/** The keyboard way to book: choose the build, the printer and the start, then book. */
export function ScheduleForm({ drafts, scheduled, printers, timeZone, busy, onSubmit }: ScheduleFormProps) {
  const [buildId, setBuildId] = useState("");
  const [printerId, setPrinterId] = useState("");
  // The next whole hour of shop time (in a zone with a half-hour offset that is not UTC's).
  const [start, setStart] = useState(() => `${toLocalInput(new Date(Date.now() + 60 * 60_000).toISOString(), timeZone).slice(0, 14)}00`);
  const [error, setError] = useState<string | null>(null);

  const options = useMemo(
    () => [
      ...drafts.map((d) => ({ id: d.id, code: d.code, version: d.version, label: `${d.code} · ${d.material_code} (unscheduled)`, verdicts: d.printers, current: null as FloorEvent | null })),
      ...scheduled.map((e) => ({ id: e.id, code: e.title.split(" ")[0], version: e.version, label: `${e.title} (booked)`, verdicts: null, current: e })),
    ],
    [drafts, scheduled],
  );
  const chosen = options.find((o) => o.id === buildId);

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setError(null);
    if (!chosen) return setError("Choose a build.");
    if (!printerId) return setError("Choose a printer.");
    const at = fromLocalInput(start, timeZone);
    if (!at) return setError("Enter a start date and time.");
    const before: Slot = chosen.current ? { printer_id: chosen.current.resource_id, starts_at: chosen.current.start } : { printer_id: null, starts_at: null };
    const ok = await onSubmit({ build_id: chosen.id, code: chosen.code, version: chosen.version }, { printer_id: printerId, starts_at: at }, before);
    if (ok) setBuildId("");
  }

  async function unbook() {
    if (!chosen?.current) return;
    await onSubmit({ build_id: chosen.id, code: chosen.code, version: chosen.version }, { printer_id: null, starts_at: null }, { printer_id: chosen.current.resource_id, starts_at: chosen.current.start });
    setBuildId("");
  }

  const field = "mt-1 block w-full rounded-md border border-soot-200 bg-white px-2 py-1.5 text-sm focus:border-clay-500 focus:outline-none";
  return (
    <form onSubmit={submit} className="rounded-card border border-soot-200 bg-white p-3 shadow-card" aria-labelledby="book-heading" noValidate>
      <h2 id="book-heading" className="font-display text-base font-semibold text-soot-900">Book without dragging</h2>
      <label className="mt-2 block text-xs font-medium text-soot-700">
        Build
        <select className={field} value={buildId} onChange={(e) => setBuildId(e.target.value)} name="build">
          <option value="">Choose a build…</option>
          {options.map((o) => (
            <option key={o.id} value={o.id}>{o.label}</option>
          ))}
        </select>
      </label>
      <label className="mt-2 block text-xs font-medium text-soot-700">
        Printer
        <select className={field} value={printerId} onChange={(e) => setPrinterId(e.target.value)} name="printer">
          <option value="">Choose a printer…</option>
          {printers.map((p) => {
            const v = chosen?.verdicts?.find((x) => x.printer_id === p.id);
            const no = v && !v.ok;
            return (
              <option key={p.id} value={p.id} disabled={!!no}>
                {p.title}
                {v ? (v.ok ? ` (${minutesLabel(v.est_minutes ?? 0)})` : ` (cannot: ${v.reason})`) : ""}
              </option>
            );
          })}
        </select>
      </label>
      <label className="mt-2 block text-xs font-medium text-soot-700">
        Start (shop time, {timeZone.replaceAll("_", " ")})
        <input type="datetime-local" className={field} value={start} onChange={(e) => setStart(e.target.value)} name="start" step={900} />
      </label>
      {error ? <p role="alert" className="mt-2 text-xs text-oxide-700">{error}</p> : null}
      <div className="mt-3 flex gap-2">
        <button type="submit" disabled={busy} className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          Book
        </button>
        {chosen?.current ? (
          <button type="button" onClick={unbook} disabled={busy} className="rounded-md border border-soot-300 px-3 py-1.5 text-sm font-semibold text-soot-700 hover:bg-soot-100 disabled:opacity-60">
            Take off the floor
          </button>
        ) : null}
      </div>
    </form>
  );
}
