"use client";

import { useState } from "react";
import { CartesianGrid, Line, LineChart, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import type { MaterialProjection } from "@/lib/inventory/types";
import { kg } from "./format";

export type ProjectionViewProps = { materials: MaterialProjection[]; days: number };

/** Per material: on the shelf now, promised to scheduled builds, and when it runs short. */
export function ProjectionView({ materials, days }: ProjectionViewProps) {
  const [selected, setSelected] = useState(materials.find((m) => m.projection.first_short_day || m.projection.first_below_reorder_day)?.id ?? materials[0]?.id);
  const m = materials.find((x) => x.id === selected);
  return (
    <section aria-labelledby="projection-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
      <h2 id="projection-heading" className="font-display text-lg font-semibold">On hand and projected, next {days} days</h2>
      <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Feedstock per material, scrolls sideways">
        <table className="w-full min-w-[640px] text-sm">
          <thead>
            <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-600">
              <th className="px-2 py-2">Material</th>
              <th className="px-2 py-2 text-right">Released, in date</th>
              <th className="px-2 py-2 text-right">In quarantine</th>
              <th className="px-2 py-2 text-right">Scheduled builds take</th>
              <th className="px-2 py-2">Below reorder point</th>
              <th className="px-2 py-2">Runs short</th>
            </tr>
          </thead>
          <tbody>
            {materials.map((x) => (
              <tr key={x.id} className={`border-b border-soot-100 ${x.id === selected ? "bg-clay-50" : ""}`}>
                <td className="px-2 py-1">
                  <button type="button" onClick={() => setSelected(x.id)} aria-pressed={x.id === selected} className="min-h-11 font-semibold text-clay-800 underline-offset-2 hover:underline">
                    {x.code}
                  </button>
                </td>
                <td className="px-2 py-1 text-right tabular-nums">{kg(x.projection.on_hand_g)}</td>
                <td className="px-2 py-1 text-right tabular-nums">{kg(x.quarantine_g)}</td>
                <td className="px-2 py-1 text-right tabular-nums">{kg(x.projection.committed_g)}</td>
                <td className="px-2 py-1">{x.projection.first_below_reorder_day ?? "—"}</td>
                <td className={`px-2 py-1 ${x.projection.first_short_day ? "font-semibold text-oxide-700" : ""}`}>
                  {x.projection.first_short_day ? `${x.projection.first_short_day} (${x.projection.short_builds.length} builds)` : "not within the horizon"}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {m ? (
        <figure className="mt-4">
          <figcaption className="text-sm text-soot-700">
            {m.code}: projected on hand by day, with the reorder point of {kg(m.reorder_point_g)} ({m.lead_time_days}-day lead time)
          </figcaption>
          <div className="h-56 w-full" role="img" aria-label={`Projected ${m.code} on hand: ${m.projection.days.map((d) => `${d.day} ${kg(d.on_hand_g)}`).join("; ")}`}>
            <ResponsiveContainer width="100%" height="100%">
              <LineChart data={m.projection.days.map((d) => ({ day: d.day.slice(5), kg: d.on_hand_g / 1000 }))} margin={{ top: 8, right: 12, bottom: 0, left: 0 }}>
                <CartesianGrid stroke="#e9e6e1" />
                <XAxis dataKey="day" tick={{ fontSize: 11 }} interval="preserveStartEnd" />
                <YAxis tick={{ fontSize: 11 }} width={44} unit=" kg" />
                <Tooltip formatter={(v) => `${Number(v).toFixed(1)} kg`} />
                <ReferenceLine y={m.reorder_point_g / 1000} stroke="#9c7a1f" strokeDasharray="4 3" label={{ value: "reorder", fontSize: 11, fill: "#574f44" }} />
                <ReferenceLine y={0} stroke="#8e2a20" />
                <Line type="stepAfter" dataKey="kg" stroke="#873d25" strokeWidth={2} dot={false} isAnimationActive={false} />
              </LineChart>
            </ResponsiveContainer>
          </div>
        </figure>
      ) : null}
    </section>
  );
}
