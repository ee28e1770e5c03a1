"use client";

import { Area, AreaChart, CartesianGrid, ReferenceLine, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";

export type CurvePoint = { minute: number; temp_c: number; phase: string };

export type ProfileChartProps = {
  curve: CurvePoint[];
  /** Minutes since the start of the cycle at which to draw "now" (a running run). */
  nowMinute?: number | null;
  /** When the run starts: the axis then reads clock time in the shop's zone. */
  startsAt?: string | null;
  timeZone?: string;
  height?: number;
};

const hhmm = (m: number) => `${Math.floor(m / 60)}:${String(Math.round(m % 60)).padStart(2, "0")}`;

/** Set-point temperature against time for one sinter profile on one furnace. */
export function ProfileChart({ curve, nowMinute = null, startsAt = null, timeZone = "UTC", height = 260 }: ProfileChartProps) {
  const start = startsAt ? Date.parse(startsAt) : null;
  const clock = (m: number) =>
    start === null
      ? `${hhmm(m)} h`
      : new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(new Date(start + m * 60_000));
  const total = curve.length ? curve[curve.length - 1].minute : 0;
  const peak = curve.reduce((m, p) => Math.max(m, p.temp_c), 0);
  return (
    <figure className="m-0" data-testid="profile-chart" data-peak={peak} data-total-minutes={total}>
      <div style={{ height }}>
        <ResponsiveContainer width="100%" height="100%">
          <AreaChart data={curve} margin={{ top: 12, right: 16, left: 4, bottom: 4 }}>
            <defs>
              <linearGradient id="heat" x1="0" y1="0" x2="0" y2="1">
                <stop offset="0%" stopColor="#f26a12" stopOpacity={0.45} />
                <stop offset="100%" stopColor="#f26a12" stopOpacity={0.04} />
              </linearGradient>
            </defs>
            <CartesianGrid strokeDasharray="3 3" stroke="#e9e6e1" />
            <XAxis dataKey="minute" type="number" domain={[0, total]} tickFormatter={clock} tick={{ fontSize: 11 }} minTickGap={28} />
            <YAxis dataKey="temp_c" unit=" °C" tick={{ fontSize: 11 }} width={62} domain={[0, Math.ceil((peak + 50) / 100) * 100]} />
            <Tooltip
              formatter={(v) => [`${Math.round(Number(v))} °C`, "Set-point"]}
              labelFormatter={(m) => `${clock(Number(m))} · ${curve.find((p) => p.minute >= Number(m))?.phase ?? ""}`}
            />
            <Area type="linear" dataKey="temp_c" stroke="#d0520a" strokeWidth={2} fill="url(#heat)" isAnimationActive={false} />
            {nowMinute !== null && nowMinute >= 0 && nowMinute <= total ? (
              <ReferenceLine x={nowMinute} stroke="#1b1916" strokeWidth={2} strokeDasharray="5 3" label={{ value: "now", position: "top", fontSize: 11, fill: "#1b1916" }} />
            ) : null}
          </AreaChart>
        </ResponsiveContainer>
      </div>
      <figcaption className="mt-1 text-2xs text-soot-500">
        Programmed set-point; cool-down at the slower of the profile&apos;s rate and the furnace&apos;s limit. The furnace&apos;s own controller and
        records are what count.
      </figcaption>
    </figure>
  );
}
