"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import Link from "next/link";
import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import {
  CartesianGrid,
  Legend,
  ReferenceArea,
  ReferenceLine,
  ResponsiveContainer,
  Scatter,
  ScatterChart,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import type { AxisCalibration } from "@/lib/process/calibration";
import type { CalibrationMaterialRow, MaterialCalibrationView } from "@/lib/finishing/types";
import { factorOf } from "@/lib/finishing/calibration";
import { ApiError, getJson, sendJson } from "@/components/finishing/api";
import { formatDay, formatWhen } from "@/components/finishing/format";
import { QueryProvider } from "@/components/floor/query-provider";

// Realized shrinkage per material over time, its statistics and the factors they suggest.
// An admin applies a suggestion; parts scaled after that use it, builds keep their snapshot.

export type CalibrationViewProps = { canApply: boolean; timeZone: string; initialMaterialId?: string };

export function CalibrationView(props: CalibrationViewProps) {
  return (
    <QueryProvider>
      <Inner {...props} />
    </QueryProvider>
  );
}

const AXIS_STYLE = {
  x: { name: "X", color: "#c46535", shape: "circle" as const },
  y: { name: "Y", color: "#4a6076", shape: "square" as const },
  z: { name: "Z", color: "#2f8a72", shape: "triangle" as const },
};
const pct = (s: number | undefined | null, d = 2) => (s === undefined || s === null ? "–" : `${(s * 100).toFixed(d)} %`);

function Inner({ canApply, timeZone, initialMaterialId }: CalibrationViewProps) {
  const materials = useQuery({ queryKey: ["calibration"], queryFn: () => getJson<{ materials: CalibrationMaterialRow[] }>("/api/calibration") });
  const [picked, setPicked] = useState<string | undefined>(initialMaterialId);
  const list = materials.data?.materials ?? [];
  const materialId = picked ?? list.find((m) => m.inspections > 0)?.id ?? list[0]?.id;

  if (materials.isPending) return <p className="text-sm text-soot-500">Loading materials…</p>;
  if (materials.isError) return <p className="text-sm text-oxide-700">{materials.error.message}</p>;
  return (
    <div className="space-y-5">
      <div role="tablist" aria-label="Material" className="flex flex-wrap gap-2">
        {list.map((m) => (
          <button
            key={m.id}
            role="tab"
            type="button"
            aria-selected={m.id === materialId}
            onClick={() => setPicked(m.id)}
            className={`rounded-full border px-3 py-1 text-sm ${m.id === materialId ? "border-clay-500 bg-clay-50 font-semibold text-clay-800" : "border-soot-200 bg-white text-soot-700 hover:border-clay-300"}`}
          >
            {m.code} <span className="text-xs text-soot-500">({m.inspections})</span>
          </button>
        ))}
      </div>
      {materialId ? (
        <div className="flex flex-wrap gap-x-4 text-sm">
          <a href={`/api/calibration/export?material_id=${materialId}`} download className="inline-flex min-h-11 items-center font-semibold text-clay-700 hover:underline">
            Download the calibration data (CSV)
          </a>
          <a href={`/api/inspections/export?material_id=${materialId}`} download className="inline-flex min-h-11 items-center font-semibold text-clay-700 hover:underline">
            Download its inspections (CSV)
          </a>
        </div>
      ) : null}
      {materialId ? <MaterialPanel key={materialId} materialId={materialId} canApply={canApply} timeZone={timeZone} /> : <p className="text-sm text-soot-500">No materials are set up.</p>}
    </div>
  );
}

function MaterialPanel({ materialId, canApply, timeZone }: { materialId: string; canApply: boolean; timeZone: string }) {
  const qc = useQueryClient();
  const key = ["calibration", materialId];
  const view = useQuery({ queryKey: key, queryFn: () => getJson<MaterialCalibrationView>(`/api/calibration/${materialId}`) });
  const [axes, setAxes] = useState<{ xy: boolean; z: boolean }>({ xy: true, z: true });
  const [flash, setFlash] = useState<{ tone: "danger" | "success"; text: string } | null>(null);
  const refresh = () => {
    qc.invalidateQueries({ queryKey: key });
    qc.invalidateQueries({ queryKey: ["calibration"], exact: true });
  };
  const apply = useMutation({
    mutationFn: (v: MaterialCalibrationView) => {
      const chosen = (["xy", "z"] as const).filter((a) => axes[a] && v.applicable[a] !== undefined);
      return sendJson<{ to: { shrink_xy: number; shrink_z: number } }>(`/api/calibration/${materialId}/apply`, "POST", {
        version: v.material.version,
        axes: chosen,
        expected: { xy: chosen.includes("xy") ? v.applicable.xy : undefined, z: chosen.includes("z") ? v.applicable.z : undefined },
      });
    },
    onSuccess: (r) => {
      setFlash({ tone: "success", text: `Applied: XY ${pct(r.to.shrink_xy, 3)}, Z ${pct(r.to.shrink_z, 3)}. Parts are being rescaled; builds already made keep their factors.` });
      refresh();
    },
    onError: (err) => {
      setFlash({ tone: "danger", text: err instanceof ApiError ? err.message : "The change did not go through." });
      refresh();
    },
  });
  const exclude = useMutation({
    mutationFn: (v: { id: string; excluded: boolean; reason?: string }) =>
      sendJson(`/api/inspections/${v.id}`, "PATCH", { excluded_from_calibration: v.excluded, reason: v.reason }),
    onSuccess: refresh,
    onError: (err) => setFlash({ tone: "danger", text: err instanceof ApiError ? err.message : "The change did not go through." }),
  });

  if (view.isPending) return <p className="text-sm text-soot-500">Loading…</p>;
  if (view.isError) return <p className="text-sm text-oxide-700">{view.error.message}</p>;
  const v = view.data;
  const cal = v.calibration;
  const data = (axis: "x" | "y" | "z") =>
    v.points.filter((p) => p.axis === axis).map((p) => ({ t: new Date(p.at).getTime(), s: p.shrinkage * 100, serial: p.serial, source: p.green_source }));
  const applied = v.history.filter((h) => h.kind === "calibration_applied" || h.kind === "shrinkage_change");
  const canApplyAny = canApply && (v.applicable.xy !== undefined || v.applicable.z !== undefined);
  const times = v.points.map((p) => new Date(p.at).getTime());
  // Over a few days a tick needs the hour too, or every tick reads the same date.
  const shortSpan = times.length > 0 && Math.max(...times) - Math.min(...times) < 4 * 86_400_000;
  const recent = [...new Map(v.points.map((p) => [p.inspection_id, p])).values()].reverse().slice(0, 12);

  return (
    <div className="space-y-5" data-testid="calibration-panel" data-material={v.material.code}>
      <div className="grid grid-cols-1 items-start gap-5 xl:grid-cols-[minmax(0,1.35fr)_minmax(0,1fr)]">
        <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label="Realized shrinkage over time">
          <h2 className="font-display text-lg font-semibold text-soot-900">
            {v.material.name}: realized shrinkage over time
          </h2>
          <p className="text-xs text-soot-500">
            Each point is one inspection: s = 1 − sintered / green on one axis. Dashed lines: measured means (band: 95 % interval of the XY mean); dotted: the factors in use now.
          </p>
          <div className="mt-3 h-80" data-testid="calibration-chart" data-points={v.points.length}>
            {v.points.length ? (
              <ResponsiveContainer width="100%" height="100%">
                <ScatterChart margin={{ top: 10, right: 20, bottom: 10, left: 0 }}>
                  <CartesianGrid stroke="#e9e6e1" />
                  <XAxis
                    type="number"
                    dataKey="t"
                    name="inspected"
                    domain={["dataMin - 43200000", "dataMax + 43200000"]}
                    tickFormatter={(t: number) => (shortSpan ? formatWhen(new Date(t), timeZone) : formatDay(new Date(t), timeZone)).replace(/^\w+,? /, "")}
                    tick={{ fontSize: 11 }}
                  />
                  <YAxis type="number" dataKey="s" name="shrinkage" unit=" %" domain={["auto", "auto"]} tick={{ fontSize: 11 }} width={60} tickFormatter={(s: number) => s.toFixed(1)} />
                  {cal.xy?.interval ? (
                    <ReferenceArea y1={cal.xy.interval.shrinkage[0] * 100} y2={cal.xy.interval.shrinkage[1] * 100} fill="#c46535" fillOpacity={0.08} />
                  ) : null}
                  {cal.xy ? <ReferenceLine y={cal.xy.meanShrinkage * 100} stroke="#a84f2a" strokeDasharray="6 4" label={{ value: "XY mean", position: "insideTopLeft", fontSize: 10, fill: "#a84f2a" }} /> : null}
                  {cal.z ? <ReferenceLine y={cal.z.meanShrinkage * 100} stroke="#1e5c4c" strokeDasharray="6 4" label={{ value: "Z mean", position: "insideTopLeft", fontSize: 10, fill: "#1e5c4c" }} /> : null}
                  <ReferenceLine y={v.material.shrink_xy * 100} stroke="#a84f2a" strokeDasharray="2 3" label={{ value: "XY in use", position: "insideBottomRight", fontSize: 10, fill: "#a84f2a" }} />
                  <ReferenceLine y={v.material.shrink_z * 100} stroke="#1e5c4c" strokeDasharray="2 3" label={{ value: "Z in use", position: "insideBottomRight", fontSize: 10, fill: "#1e5c4c" }} />
                  {applied.map((h) => (
                    <ReferenceLine key={h.id} x={new Date(h.created_at).getTime()} stroke="#9c7a1f" strokeDasharray="3 3" />
                  ))}
                  <Tooltip
                    cursor={{ strokeDasharray: "3 3" }}
                    formatter={(value, name) => (name === "shrinkage" ? `${Number(value).toFixed(3)} %` : formatWhen(new Date(Number(value)), timeZone))}
                  />
                  <Legend />
                  {(["x", "y", "z"] as const).map((a) => (
                    <Scatter key={a} name={`${AXIS_STYLE[a].name} axis`} data={data(a)} fill={AXIS_STYLE[a].color} shape={AXIS_STYLE[a].shape} isAnimationActive={false} />
                  ))}
                </ScatterChart>
              </ResponsiveContainer>
            ) : (
              <p className="flex h-full items-center justify-center rounded border border-dashed border-soot-200 text-sm text-soot-500">
                No inspection of this material has both a green and an as-sintered size yet.
              </p>
            )}
          </div>
          {v.rejected.length ? (
            <p className="mt-2 text-xs text-brass-600">
              Set aside as implausible: {v.rejected.map((r) => `${r.serial} ${r.axis.toUpperCase()} (${r.reason})`).join("; ")}.
            </p>
          ) : null}
        </section>

        <section className="space-y-3 rounded-card border border-soot-200 bg-white p-4" aria-label="Statistics and suggestion">
          <h2 className="font-display text-lg font-semibold text-soot-900">Statistics</h2>
          <StatsTable v={v} />
          <p className="text-2xs text-soot-500">
            Mean and sample standard deviation by Welford&rsquo;s running update; the interval is mean ± t(0.975, n − 1)·s/√n. XY pools the X and Y readings, which the material stores as one
            value. Factor f = 1/(1 − s). A suggestion can be applied from {v.min_samples} inspections on.
          </p>
          {flash ? (
            <p role={flash.tone === "danger" ? "alert" : "status"} className={`rounded px-3 py-2 text-sm ${flash.tone === "danger" ? "bg-oxide-100 text-oxide-700" : "bg-verdigris-100 text-verdigris-700"}`}>
              {flash.text}
            </p>
          ) : null}
          {canApply ? (
            <div className="rounded-md border border-soot-200 p-3">
              <div className="flex flex-wrap gap-4 text-sm">
                {(["xy", "z"] as const).map((a) => (
                  <label key={a} className={`flex items-center gap-1.5 ${v.applicable[a] === undefined ? "text-soot-500" : ""}`}>
                    <input type="checkbox" checked={axes[a] && v.applicable[a] !== undefined} disabled={v.applicable[a] === undefined} onChange={(e) => setAxes({ ...axes, [a]: e.target.checked })} />
                    {a.toUpperCase()} → {pct(v.applicable[a], 3)}
                  </label>
                ))}
              </div>
              <button
                type="button"
                disabled={!canApplyAny || apply.isPending || !(axes.xy || axes.z)}
                onClick={() => apply.mutate(v)}
                className="mt-2 rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50"
              >
                Apply to {v.material.code}
              </button>
              <p className="mt-1 text-2xs text-soot-500">New scale-ups use the new factors; builds already printed keep the factors they were printed with.</p>
            </div>
          ) : (
            <p className="text-xs text-soot-500">An admin applies a suggestion to the material.</p>
          )}
        </section>
      </div>

      <div className="grid grid-cols-1 gap-5 xl:grid-cols-2">
        <section className="rounded-card border border-soot-200 bg-white p-4" aria-label="Latest measurements">
          <h3 className="text-sm font-semibold text-soot-800">Latest measurements</h3>
          <ScrollRegion label="Recent inspections"><table className="tabular mt-2 w-full text-sm" data-testid="calibration-recent">
            <thead className="text-left text-2xs uppercase tracking-wide text-soot-500">
              <tr>
                <th className="py-1">Unit</th>
                <th className="py-1">Inspected</th>
                <th className="py-1">X</th>
                <th className="py-1">Y</th>
                <th className="py-1">Z</th>
                <th className="py-1">Green from</th>
                {canApply ? <th className="py-1" /> : null}
              </tr>
            </thead>
            <tbody>
              {recent.map((p) => {
                const of = (a: "x" | "y" | "z") => v.points.find((q) => q.inspection_id === p.inspection_id && q.axis === a)?.shrinkage;
                return (
                  <tr key={p.inspection_id} className="border-t border-soot-100">
                    <td className="py-1"><Link href={`/units/${p.unit_id}`} className="font-mono text-xs text-clay-700 hover:underline">{p.serial}</Link></td>
                    <td className="py-1 text-xs">{formatWhen(p.at, timeZone)}</td>
                    <td className="py-1">{pct(of("x"))}</td>
                    <td className="py-1">{pct(of("y"))}</td>
                    <td className="py-1">{pct(of("z"))}</td>
                    <td className="py-1 text-xs">{p.green_source === "planned" ? "scale-up" : "measured"}</td>
                    {canApply ? (
                      <td className="py-1 text-right">
                        <button
                          type="button"
                          className="text-xs text-soot-500 hover:text-oxide-700"
                          onClick={() => {
                            const reason = window.prompt("Why leave this measurement out of calibration?");
                            if (reason) exclude.mutate({ id: p.inspection_id, excluded: true, reason });
                          }}
                        >
                          Leave out
                        </button>
                      </td>
                    ) : null}
                  </tr>
                );
              })}
            </tbody>
          </table></ScrollRegion>
          {v.excluded.length ? (
            <div className="mt-3 text-xs text-soot-600">
              <h4 className="font-semibold">Left out</h4>
              <ul>
                {v.excluded.map((x) => (
                  <li key={x.id} className="flex items-center gap-2">
                    <span className="font-mono">{x.serial}</span> {x.exclusion_reason}
                    {canApply ? (
                      <button type="button" className="text-clay-700 hover:underline" onClick={() => exclude.mutate({ id: x.id, excluded: false })}>
                        take back in
                      </button>
                    ) : null}
                  </li>
                ))}
              </ul>
            </div>
          ) : null}
        </section>

        <section className="rounded-card border border-soot-200 bg-white p-4" aria-label="Changes to the factors">
          <h3 className="text-sm font-semibold text-soot-800">Changes to {v.material.code}&rsquo;s shrinkage</h3>
          {applied.length ? (
            <ul className="mt-2 space-y-2 text-sm" data-testid="calibration-history">
              {applied.map((h) => {
                const d = (h.data ?? {}) as { from?: { shrink_xy: number; shrink_z: number }; to?: { shrink_xy: number; shrink_z: number } };
                return (
                  <li key={h.id} className="border-t border-soot-100 pt-2 first:border-0 first:pt-0">
                    <div className="text-xs text-soot-500">
                      {formatWhen(h.created_at, timeZone)} · {h.actor_name ?? "unknown"} · {h.kind === "calibration_applied" ? "from calibration" : "edited in set-up"}
                    </div>
                    {d.from && d.to ? (
                      <div className="tabular">
                        XY {pct(d.from.shrink_xy, 3)} → {pct(d.to.shrink_xy, 3)} · Z {pct(d.from.shrink_z, 3)} → {pct(d.to.shrink_z, 3)}
                      </div>
                    ) : null}
                    {h.reason ? <div className="text-xs text-soot-600">{h.reason}</div> : null}
                  </li>
                );
              })}
            </ul>
          ) : (
            <p className="mt-2 text-sm text-soot-500">The factors have not been changed since the material was set up.</p>
          )}
        </section>
      </div>
    </div>
  );
}

function StatsTable({ v }: { v: MaterialCalibrationView }) {
  const rows: Array<{ key: string; label: string; cal?: AxisCalibration; current?: number; minor?: boolean }> = [
    { key: "xy", label: "XY", cal: v.calibration.xy, current: v.material.shrink_xy },
    { key: "x", label: "X alone", cal: v.calibration.x, minor: true },
    { key: "y", label: "Y alone", cal: v.calibration.y, minor: true },
    { key: "z", label: "Z", cal: v.calibration.z, current: v.material.shrink_z },
  ];
  return (
    <ScrollRegion label="Shrinkage per material"><table className="tabular w-full whitespace-nowrap text-xs" data-testid="calibration-stats">
      <thead className="text-left text-2xs uppercase tracking-wide text-soot-500">
        <tr>
          <th className="py-1 pr-2">Axis</th>
          <th className="py-1 pr-2">n</th>
          <th className="py-1 pr-2">Mean</th>
          <th className="py-1 pr-2">s.d.</th>
          <th className="py-1 pr-2">95 % interval</th>
          <th className="py-1 pr-2">Factor</th>
          <th className="py-1 pr-2">In use</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.key} className={`border-t border-soot-100 align-top ${r.minor ? "text-soot-500" : "text-sm"}`} data-axis={r.key}>
            <td className="py-1 pr-2 font-semibold">{r.label}</td>
            <td className="py-1 pr-2" data-testid={`count-${r.key}`}>{r.cal?.count ?? 0}</td>
            <td className="py-1 pr-2">{pct(r.cal?.meanShrinkage, 3)}</td>
            <td className="py-1 pr-2">{pct(r.cal?.stdDev, 3)}</td>
            <td className="py-1 pr-2">{r.cal?.interval ? `${(r.cal.interval.shrinkage[0] * 100).toFixed(2)}–${pct(r.cal.interval.shrinkage[1])}` : "–"}</td>
            <td className="py-1 pr-2">
              {r.cal ? r.cal.suggestedFactor.toFixed(4) : "–"}
              {r.cal?.interval ? <div className="text-2xs text-soot-500">{r.cal.interval.factor[0].toFixed(4)} – {r.cal.interval.factor[1].toFixed(4)}</div> : null}
            </td>
            <td className="py-1 pr-2">{r.current !== undefined ? <>{pct(r.current, 3)}<div className="text-2xs text-soot-500">f {factorOf(r.current).toFixed(4)}</div></> : ""}</td>
          </tr>
        ))}
      </tbody>
    </table></ScrollRegion>
  );
}
