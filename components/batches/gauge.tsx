import type { Gauge } from "@/lib/batches/rules";

export type GaugeBarProps = { gauge: Gauge; /** What the pending drop would make it. */ preview?: number | null };

const fmt = (x: number, unit: string) => {
  const v = unit === "g" && x >= 1000 ? `${(x / 1000).toFixed(1)} k` : Number.isInteger(x) ? String(x) : x.toFixed(x < 10 ? 1 : 0);
  return unit ? `${v}${unit === "g" && x >= 1000 ? "g" : ` ${unit}`}` : v;
};

function tone(fraction: number) {
  if (fraction > 1 + 1e-9) return { bar: "bg-oxide-500", word: "over" };
  if (fraction >= 0.9) return { bar: "bg-brass-400", word: "nearly full" };
  return { bar: "bg-verdigris-500", word: "" };
}

/** A capacity bar: the colour always comes with the number and, near the limit, a word. */
export function GaugeBar({ gauge, preview }: GaugeBarProps) {
  const f = Math.max(0, gauge.fraction);
  const t = tone(f);
  const p = preview ?? null;
  return (
    <div data-gauge={gauge.key} data-fraction={f.toFixed(4)} className="text-2xs">
      <div className="flex items-baseline justify-between gap-2 text-soot-600">
        <span>{gauge.label}</span>
        <span className="tabular font-mono text-soot-800">
          {fmt(gauge.used, gauge.unit)} / {fmt(gauge.capacity, gauge.unit)} · {Math.round(f * 100)} %{t.word ? ` · ${t.word}` : ""}
        </span>
      </div>
      <div
        className="relative mt-0.5 h-1.5 overflow-hidden rounded-full bg-soot-100"
        role="meter"
        aria-label={gauge.label}
        aria-valuemin={0}
        aria-valuemax={gauge.capacity}
        aria-valuenow={gauge.used}
      >
        {p !== null && p > f ? <div className="absolute inset-y-0 left-0 bg-ember-400/50" style={{ width: `${Math.min(1, p) * 100}%` }} /> : null}
        <div className={`absolute inset-y-0 left-0 ${t.bar}`} style={{ width: `${Math.min(1, f) * 100}%` }} />
      </div>
    </div>
  );
}
