"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import {
  Bar,
  BarChart,
  CartesianGrid,
  Legend,
  Line,
  LineChart,
  ReferenceLine,
  ResponsiveContainer,
  Tooltip,
  XAxis,
  YAxis,
} from "recharts";
import type { KindUtilizationRow, QueueRow, ThroughputRow, UtilizationRow } from "@/lib/capacity/summary";

// The capacity charts. Every series also has a table or a label beside it: colour is never the
// only way to tell two resources apart (each line has its own dash pattern too).

const PALETTE = ["#c46535", "#4a6076", "#2f8a72", "#9c7a1f", "#8e2a20", "#6f6557", "#d07d4f", "#7d93ab"];
const DASHES = ["", "6 3", "2 3", "8 3 2 3", "1 2", "10 4", "4 4", "3 6"];
const tick = { fontSize: 11, fill: "#6f6557" };
const pct = (v: number | null | undefined) => (v === null || v === undefined ? "–" : `${(v * 100).toFixed(0)} %`);
const shortDay = (label: string) => {
  const [, m, d] = label.split("-").map(Number);
  return `${d} ${["Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec"][m - 1]}`;
};

export function UtilizationChart({ rows, kind, period, today }: { rows: UtilizationRow[]; kind?: KindUtilizationRow; period: "day" | "week"; today?: string }) {
  if (!rows.length) return <p className="text-sm text-soot-500">No active resources of this kind.</p>;
  const labels = rows[0].periods.map((p) => p.label);
  const data = labels.map((label, i) => {
    const point: Record<string, number | string | null> = { label };
    for (const r of rows) point[r.name] = r.periods[i].utilization === null ? null : r.periods[i].utilization! * 100;
    if (kind) point["all"] = kind.periods[i].utilization === null ? null : kind.periods[i].utilization! * 100;
    return point;
  });
  const common = (
    <>
      <CartesianGrid stroke="#e9e6e1" vertical={false} />
      <XAxis dataKey="label" tick={tick} tickFormatter={shortDay} interval="preserveStartEnd" minTickGap={12} />
      <YAxis domain={[0, 100]} tick={tick} unit=" %" width={48} />
      <Tooltip formatter={(v) => (v === null ? "–" : `${Number(v).toFixed(1)} %`)} labelFormatter={(l) => (period === "week" ? `week of ${shortDay(String(l))}` : shortDay(String(l)))} />
      <Legend wrapperStyle={{ fontSize: 12 }} />
      {today && period === "day" ? <ReferenceLine x={today} stroke="#f26a12" strokeDasharray="3 3" label={{ value: "today", fontSize: 10, fill: "#d0520a", position: "insideTopRight" }} /> : null}
    </>
  );
  return (
    <div className="h-64">
      <ResponsiveContainer width="100%" height="100%">
        {period === "day" ? (
          <LineChart data={data} margin={{ top: 8, right: 12, bottom: 0, left: 0 }}>
            {common}
            {rows.map((r, i) => (
              <Line key={r.resource_id} type="stepAfter" dataKey={r.name} stroke={PALETTE[i % PALETTE.length]} strokeDasharray={DASHES[i % DASHES.length]} dot={false} strokeWidth={1.6} isAnimationActive={false} connectNulls={false} />
            ))}
            {kind ? <Line type="stepAfter" dataKey="all" name="all, pooled" stroke="#1b1916" strokeWidth={2.4} dot={false} isAnimationActive={false} /> : null}
          </LineChart>
        ) : (
          <BarChart data={data} margin={{ top: 8, right: 12, bottom: 0, left: 0 }}>
            {common}
            {rows.map((r, i) => (
              <Bar key={r.resource_id} dataKey={r.name} fill={PALETTE[i % PALETTE.length]} isAnimationActive={false} />
            ))}
          </BarChart>
        )}
      </ResponsiveContainer>
    </div>
  );
}

export function UtilizationTable({ rows, kind }: { rows: UtilizationRow[]; kind?: KindUtilizationRow }) {
  return (
    <ScrollRegion label="Figures behind the chart"><table className="tabular mt-2 w-full whitespace-nowrap text-xs">
      <thead className="text-left text-2xs uppercase tracking-wide text-soot-500">
        <tr>
          <th className="py-1">Resource</th>
          <th className="py-1 pl-2 text-right" title="booked hours">Busy h</th>
          <th className="py-1 pl-2 text-right" title="hours less maintenance">Open h</th>
          <th className="py-1 pl-2 text-right" title="maintenance hours">Maint. h</th>
          <th className="py-1 pl-2 text-right">Used</th>
        </tr>
      </thead>
      <tbody>
        {rows.map((r) => (
          <tr key={r.resource_id} className="border-t border-soot-100" data-resource={r.name}>
            <td className="py-1">{r.name}</td>
            <td className="py-1 text-right">{r.total.busy_hours.toFixed(1)}</td>
            <td className="py-1 text-right">{r.total.available_hours.toFixed(1)}</td>
            <td className="py-1 text-right">{r.total.maintenance_hours.toFixed(1)}</td>
            <td className="py-1 text-right font-semibold">{pct(r.total.utilization)}</td>
          </tr>
        ))}
        {kind ? (
          <tr className="border-t border-soot-300 font-semibold">
            <td className="py-1">All, pooled</td>
            <td className="py-1 text-right">{kind.total.busy_hours.toFixed(1)}</td>
            <td className="py-1 text-right">{kind.total.available_hours.toFixed(1)}</td>
            <td className="py-1 text-right">{kind.total.maintenance_hours.toFixed(1)}</td>
            <td className="py-1 text-right">{pct(kind.total.utilization)}</td>
          </tr>
        ) : null}
      </tbody>
    </table></ScrollRegion>
  );
}

export function QueueChart({ rows }: { rows: QueueRow[] }) {
  const data = rows.map((r) => ({ name: r.name, hours: Math.round(r.hours_ahead * 10) / 10 }));
  return (
    <div style={{ height: Math.max(160, rows.length * 30 + 40) }}>
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} layout="vertical" margin={{ top: 4, right: 40, bottom: 0, left: 10 }}>
          <CartesianGrid stroke="#e9e6e1" horizontal={false} />
          <XAxis type="number" tick={tick} unit=" h" />
          <YAxis type="category" dataKey="name" tick={tick} width={90} />
          <Tooltip formatter={(v) => `${v} h booked ahead`} />
          <Bar dataKey="hours" fill="#c46535" isAnimationActive={false} label={{ position: "right", fontSize: 11, fill: "#403a33", formatter: (v: unknown) => `${v} h` }} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

export function WipChart({ rows }: { rows: Array<{ state: string; count: number }> }) {
  const data = rows.map((r) => ({ state: r.state.replaceAll("_", " "), units: r.count }));
  return (
    <div className="h-56">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 16, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke="#e9e6e1" vertical={false} />
          <XAxis dataKey="state" tick={{ ...tick, fontSize: 10 }} interval={0} angle={-25} textAnchor="end" height={56} />
          <YAxis allowDecimals={false} tick={tick} width={32} />
          <Tooltip />
          <Bar dataKey="units" fill="#4a6076" isAnimationActive={false} label={{ position: "top", fontSize: 11, fill: "#403a33" }} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}

export function ThroughputChart({ rows }: { rows: ThroughputRow[] }) {
  const data = rows.map((r) => ({ week: r.week, finished: r.done, sintered: r.sintered }));
  return (
    <div className="h-56">
      <ResponsiveContainer width="100%" height="100%">
        <BarChart data={data} margin={{ top: 16, right: 8, bottom: 0, left: 0 }}>
          <CartesianGrid stroke="#e9e6e1" vertical={false} />
          <XAxis dataKey="week" tick={tick} tickFormatter={(w: string) => `wk ${shortDay(w)}`} />
          <YAxis allowDecimals={false} tick={tick} width={32} />
          <Tooltip labelFormatter={(l) => `week of ${shortDay(String(l))}`} />
          <Legend wrapperStyle={{ fontSize: 12 }} />
          <Bar dataKey="sintered" fill="#d07d4f" isAnimationActive={false} label={{ position: "top", fontSize: 10, fill: "#403a33" }} />
          <Bar dataKey="finished" fill="#2f8a72" isAnimationActive={false} label={{ position: "top", fontSize: 10, fill: "#403a33" }} />
        </BarChart>
      </ResponsiveContainer>
    </div>
  );
}
