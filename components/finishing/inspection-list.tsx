"use client";

import { useRef, useState } from "react";
import { formatLength, toFixedClean, type UnitSystem } from "@/lib/units";
import { ATTACHMENT_TYPES } from "@/lib/finishing/schemas";
import type { InspectionView } from "@/lib/finishing/types";
import { ApiError, uploadWithProgress } from "./api";
import { formatWhen, ra, stockCheckText } from "./format";

// Inspections of one unit, newest first, each with its readings, its stock check and its
// attachments; photos and PDF reports can be added with an upload that shows its progress.

export type InspectionListProps = {
  inspections: InspectionView[];
  units: UnitSystem;
  timeZone: string;
  canAttach: boolean;
  onChanged: () => void;
};

const AXES = ["x", "y", "z"] as const;

function Sizes({ label, v, units }: { label: string; v: InspectionView["green"]; units: UnitSystem }) {
  if (AXES.every((a) => v[a] === null)) return null;
  return (
    <div>
      <dt className="text-2xs uppercase tracking-wide text-soot-500">{label}</dt>
      <dd className="tabular">{AXES.map((a) => `${a.toUpperCase()} ${v[a] === null ? "–" : formatLength(v[a]!, units, units === "in" ? 4 : 3)}`).join(" · ")}</dd>
    </div>
  );
}

export function InspectionList({ inspections, units, timeZone, canAttach, onChanged }: InspectionListProps) {
  if (!inspections.length) return <p className="text-sm text-soot-500">No inspection recorded yet.</p>;
  return (
    <ol className="space-y-3" data-testid="inspection-list">
      {inspections.map((i) => (
        <li key={i.id} className="rounded-card border border-soot-200 bg-white p-3 text-sm" data-inspection={i.id}>
          <div className="flex flex-wrap items-center gap-2">
            <span className={`rounded-full px-2 py-0.5 text-2xs font-semibold uppercase tracking-wide ${i.passed ? "bg-verdigris-100 text-verdigris-700" : "bg-oxide-100 text-oxide-700"}`}>
              {i.passed ? "passed" : "failed"}
            </span>
            <span className="text-soot-700">{formatWhen(i.created_at, timeZone)}</span>
            <span className="text-soot-500">by {i.inspector_name ?? "unknown"}</span>
            {i.excluded_from_calibration ? <span className="text-2xs text-brass-600">left out of calibration: {i.exclusion_reason}</span> : null}
          </div>
          {i.reason ? <p className="mt-1 text-soot-800">{i.reason}</p> : null}
          <dl className="mt-2 grid gap-2 text-xs sm:grid-cols-2">
            <Sizes label={`Green (${i.green_source === "planned" ? "as printed" : "measured"})`} v={i.green} units={units} />
            <Sizes label="As sintered" v={i.sintered} units={units} />
            <Sizes label="Finished" v={i.finished} units={units} />
            {i.ra_um !== null || i.runout_mm !== null ? (
              <div>
                <dt className="text-2xs uppercase tracking-wide text-soot-500">Surface and runout</dt>
                <dd className="tabular">
                  Ra {ra(i.ra_um, units)}
                  {i.runout_mm !== null ? ` · runout ${formatLength(i.runout_mm, units, units === "in" ? 4 : 3)} TIR across ${i.runout_axis?.toUpperCase()}` : ""}
                </dd>
              </div>
            ) : null}
          </dl>
          {i.stock_check ? (
            <p className={`mt-2 rounded px-2 py-1 text-xs ${i.stock_check.status === "warning" ? "bg-brass-100 text-brass-600" : "bg-verdigris-100 text-verdigris-700"}`}>
              {i.stock_check.status === "warning" ? "Stock warning: " : "Stock check: "}
              {stockCheckText(i.stock_check, units)}
            </p>
          ) : null}
          {i.notes ? <p className="mt-1 text-xs text-soot-600">{i.notes}</p> : null}
          <Attachments inspection={i} canAttach={canAttach} onChanged={onChanged} />
        </li>
      ))}
    </ol>
  );
}

function Attachments({ inspection, canAttach, onChanged }: { inspection: InspectionView; canAttach: boolean; onChanged: () => void }) {
  const [progress, setProgress] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);
  const ref = useRef<HTMLInputElement>(null);
  const upload = async (file: File) => {
    setError(null);
    setProgress(0);
    try {
      await uploadWithProgress(`/api/inspections/${inspection.id}/files`, file, setProgress);
      onChanged();
    } catch (err) {
      setError(err instanceof ApiError ? err.message : "The upload failed.");
    } finally {
      setProgress(null);
      if (ref.current) ref.current.value = "";
    }
  };
  return (
    <div className="mt-2">
      {inspection.files.length ? (
        <ul className="flex flex-wrap gap-2">
          {inspection.files.map((f) => (
            <li key={f.id}>
              <a href={f.url} target="_blank" rel="noreferrer" className="inline-flex items-center gap-1 rounded border border-soot-200 px-2 py-1 text-xs text-clay-700 hover:bg-clay-50">
                {f.content_type === "application/pdf" ? "PDF" : "Photo"} · {f.filename} ({toFixedClean(f.size_bytes / 1024, 0)} KB)
              </a>
            </li>
          ))}
        </ul>
      ) : null}
      {canAttach ? (
        <div className="mt-2 flex flex-wrap items-center gap-2 text-xs">
          <label className="tap-target inline-flex cursor-pointer items-center rounded border border-dashed border-soot-300 px-2 py-1 text-soot-600 hover:border-clay-400">
            Attach a photo or PDF
            <input
              ref={ref}
              type="file"
              accept={ATTACHMENT_TYPES.join(",")}
              className="sr-only"
              aria-label={`Attach a file to the inspection of ${formatDate(inspection.created_at)}`}
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void upload(f);
              }}
            />
          </label>
          {/* On a phone: straight to the rear camera; the photo goes through the same upload. */}
          <label className="tap-target inline-flex cursor-pointer items-center rounded border border-soot-300 bg-white px-2 py-1 font-semibold text-soot-800 hover:border-clay-400">
            Take a photo
            <input
              type="file"
              accept="image/*"
              capture="environment"
              className="sr-only"
              aria-label={`Take a photo for the inspection of ${formatDate(inspection.created_at)}`}
              data-testid="inspection-camera"
              onChange={(e) => {
                const f = e.target.files?.[0];
                if (f) void upload(f);
                e.target.value = "";
              }}
            />
          </label>
          {progress !== null ? (
            <span className="flex items-center gap-2" role="progressbar" aria-valuenow={Math.round(progress * 100)} aria-valuemin={0} aria-valuemax={100}>
              <span className="h-1.5 w-32 overflow-hidden rounded bg-soot-100"><span className="block h-full bg-clay-500" style={{ width: `${Math.round(progress * 100)}%` }} /></span>
              {Math.round(progress * 100)} %
            </span>
          ) : null}
          {error ? <span role="alert" className="text-oxide-700">{error}</span> : null}
        </div>
      ) : null}
    </div>
  );
}

const formatDate = (iso: string) => iso.slice(0, 16).replace("T", " ");
