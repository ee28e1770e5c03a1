"use client";

import Link from "next/link";
import { useCallback, useEffect, useState } from "react";
import type { RunDetail } from "@/lib/batches/types";
import { ApiError, getJson, sendJson } from "@/lib/http/client";
import type { ScanHit } from "@/lib/scan/codes";
import { tallyOf, type ScanOutcome } from "@/lib/scan/tally";
import { Camera } from "./camera";
import { CodeForm } from "./code-form";
import { lookUp } from "./scan-workspace";

export type LoadRunProps = { runId: string; canLoad: boolean };

type Saved = { expected: string[]; scans: ScanOutcome[] };
const storeKey = (runId: string) => `hearth:load-run:${runId}`;

/**
 * Loading a furnace run at the furnace: every traveler scanned (or its code typed) in turn. A unit
 * already on the run is ticked off; any other unit is put on the run through the same route the
 * board uses (POST /api/furnace-runs/[id]/units), which refuses a wrong profile or a full tray
 * with its reason. The tally lives in this tab's session storage, so a reload keeps it.
 */
export function LoadRun({ runId, canLoad }: LoadRunProps) {
  const [detail, setDetail] = useState<RunDetail | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [saved, setSaved] = useState<Saved | null>(null);
  const [last, setLast] = useState<ScanOutcome | null>(null);
  const [busy, setBusy] = useState(false);

  const reload = useCallback(async () => {
    const d = await getJson<RunDetail>(`/api/furnace-runs/${runId}`);
    setDetail(d);
    return d;
  }, [runId]);

  useEffect(() => {
    getJson<RunDetail>(`/api/furnace-runs/${runId}`)
      .then((d) => {
        setDetail(d);
        const raw = sessionStorage.getItem(storeKey(runId));
        const kept = raw ? (JSON.parse(raw) as Saved) : null;
        setSaved(kept ?? { expected: d.run.units.map((u) => u.serial), scans: [] });
      })
      .catch((err) => setError(err instanceof ApiError ? err.message : "The run could not be loaded."));
  }, [runId]);

  useEffect(() => {
    if (saved) sessionStorage.setItem(storeKey(runId), JSON.stringify(saved));
  }, [saved, runId]);

  const record = (o: ScanOutcome) => {
    setLast(o);
    setSaved((s) => (s ? { ...s, scans: [...s.scans, o] } : s));
  };

  async function addUnit(unit: { id: string; serial: string; version: number }, d: RunDetail): Promise<ScanOutcome> {
    if (d.run.units.some((u) => u.id === unit.id)) return { serial: unit.serial, unit_id: unit.id, status: "loaded" };
    let run = d;
    for (let attempt = 0; attempt < 2; attempt++) {
      try {
        await sendJson(`/api/furnace-runs/${runId}/units`, "POST", { version: run.run.version, unit_id: unit.id, unit_version: unit.version });
        return { serial: unit.serial, unit_id: unit.id, status: "added" };
      } catch (err) {
        // Someone else changed the run (or the unit) since it was read: read both again and try once more.
        if (err instanceof ApiError && err.status === 409 && attempt === 0) {
          run = await reload();
          const fresh = (await lookUp(unit.serial)).find((h) => h.kind === "unit");
          if (fresh) unit = { ...unit, version: fresh.version };
          continue;
        }
        return { serial: unit.serial, unit_id: unit.id, status: "refused", reason: err instanceof ApiError ? err.message : "the server could not be reached" };
      }
    }
    return { serial: unit.serial, unit_id: unit.id, status: "refused", reason: "the run kept changing; scan again" };
  }

  async function onCode(text: string) {
    if (!detail || busy) return;
    setBusy(true);
    try {
      let hits: ScanHit[];
      try {
        hits = await lookUp(text);
      } catch (err) {
        record({ serial: text.trim().toUpperCase(), unit_id: null, status: "refused", reason: err instanceof ApiError ? err.message : "the server could not be reached" });
        return;
      }
      const unit = hits.find((h) => h.kind === "unit");
      const build = hits.find((h) => h.kind === "build");
      let d = await reload();
      if (unit) {
        record(await addUnit({ id: unit.id, serial: unit.code, version: unit.version }, d));
      } else if (build) {
        // A build's traveler carries the build's code: every unit printed on it that is brown goes in.
        const b = await getJson<{ units: { id: string; serial: string; state: string; version: number }[] }>(`/api/builds/${build.id}`);
        const brown = b.units.filter((u) => u.state === "brown" || d.run.units.some((r) => r.id === u.id));
        if (!brown.length) record({ serial: build.code, unit_id: null, status: "refused", reason: `build ${build.code} has no brown units to load` });
        for (const u of brown) {
          record(await addUnit(u, d));
          d = await reload();
        }
      } else {
        record({ serial: hits[0].code, unit_id: null, status: "refused", reason: "that is not a unit or a build traveler" });
      }
      await reload();
    } finally {
      setBusy(false);
    }
  }

  if (error) return <p role="alert" className="text-sm text-oxide-700">{error}</p>;
  if (!detail || !saved) return <p className="text-sm text-soot-600">Loading the run…</p>;
  const t = tallyOf(saved.expected, detail.run.units.map((u) => u.serial), saved.scans);
  const editable = detail.run.state === "draft" || detail.run.state === "scheduled";

  return (
    <div className="mx-auto max-w-xl space-y-4" data-testid="load-run">
      <div className="rounded-card border border-soot-200 bg-white p-3 shadow-card">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 className="text-base font-semibold text-soot-900">
            Loading {detail.run.code} <span className="font-normal text-soot-600">· {detail.profile.name} · {detail.furnace.name}</span>
          </h2>
          <Link href={`/furnace-runs/${runId}`} className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">
            Open the run
          </Link>
        </div>
        <dl className="mt-2 grid grid-cols-3 gap-2 text-center sm:grid-cols-5" data-testid="tally" aria-live="polite">
          {(
            [
              ["Expected", t.expected.length, "expected"],
              ["Loaded", t.loaded.length, "loaded"],
              ["Missing", t.missing.length, "missing"],
              ["Unexpected", t.unexpected.length, "unexpected"],
              ["Refused", t.refused.length, "refused"],
            ] as const
          ).map(([label, n, key]) => (
            <div key={key} className="rounded-md bg-soot-50 px-1 py-2">
              <dt className="text-xs text-soot-600">{label}</dt>
              <dd className="text-2xl font-semibold tabular text-soot-900" data-tally={key}>
                {n}
              </dd>
            </div>
          ))}
        </dl>
      </div>

      {!canLoad ? <p className="rounded-md bg-slate2-100 px-3 py-2 text-sm text-soot-900">Only a furnace operator can load a run; the tally is shown for reading.</p> : null}
      {canLoad && !editable ? <p role="status" className="rounded-md bg-slate2-100 px-3 py-2 text-sm text-soot-900">{detail.run.code} is {detail.run.state}; units can no longer be added.</p> : null}
      {canLoad && editable ? (
        <>
          <Camera onCode={onCode} paused={busy} />
          <CodeForm onCode={onCode} busy={busy} label="Or type the serial from the traveler" hint="A unit serial, or a build code to load every brown unit of that build." button="Load" />
        </>
      ) : null}

      {last ? (
        <p
          role={last.status === "refused" ? "alert" : "status"}
          data-testid="load-last"
          className={`rounded-md px-3 py-3 text-base font-semibold ${last.status === "refused" ? "bg-oxide-100 text-oxide-700" : "bg-verdigris-100 text-verdigris-700"}`}
        >
          {last.status === "refused" ? `${last.serial} not loaded: ${last.reason}` : last.status === "added" ? `${last.serial} added to ${detail.run.code}.` : `${last.serial} ticked off.`}
        </p>
      ) : null}

      <section aria-label="Missing units" className="rounded-card border border-soot-200 bg-white p-3">
        <h3 className="text-sm font-semibold text-soot-800">Still missing ({t.missing.length})</h3>
        {t.missing.length ? (
          <ul className="mt-1 flex flex-wrap gap-1.5" data-testid="missing-list">
            {t.missing.map((s) => (
              <li key={s} className="rounded border border-soot-200 px-2 py-1 font-mono text-sm text-soot-800">
                {s}
              </li>
            ))}
          </ul>
        ) : (
          <p className="text-sm text-soot-600">Every expected unit is on the run.</p>
        )}
      </section>
      {t.unexpected.length ? (
        <section aria-label="Unexpected units" className="rounded-card border border-soot-200 bg-white p-3">
          <h3 className="text-sm font-semibold text-soot-800">Added, not on the run&rsquo;s list ({t.unexpected.length})</h3>
          <ul className="mt-1 space-y-1 text-sm" data-testid="unexpected-list">
            {t.unexpected.map((u) => (
              <li key={u.serial} className="text-verdigris-700">
                <span className="font-mono font-semibold">{u.serial}</span> added
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      {t.refused.length ? (
        <section aria-label="Refused codes" className="rounded-card border border-oxide-500/30 bg-white p-3">
          <h3 className="text-sm font-semibold text-oxide-700">Refused, not on the run ({t.refused.length})</h3>
          <ul className="mt-1 space-y-1 text-sm" data-testid="refused-list">
            {t.refused.map((u) => (
              <li key={u.serial} className="text-oxide-700" data-refused={u.serial}>
                <span className="font-mono font-semibold">{u.serial}</span> {u.reason ?? "refused"}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      <button
        type="button"
        onClick={() => {
          sessionStorage.removeItem(storeKey(runId));
          setLast(null);
          setSaved({ expected: detail.run.units.map((u) => u.serial), scans: [] });
        }}
        className="min-h-11 rounded-md border border-soot-300 px-4 text-sm text-soot-800 hover:bg-soot-50"
      >
        Start the tally again
      </button>
    </div>
  );
}
