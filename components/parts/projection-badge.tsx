export type ProjectionBadgeProps = { projection: { status: string; projected_end: string | null; slack_minutes: number | null } | null };

const STYLES: Record<string, { label: string; cls: string }> = {
  on_time: { label: "on time", cls: "border-verdigris-400/50 bg-verdigris-100 text-verdigris-700" },
  at_risk: { label: "at risk", cls: "border-brass-400/60 bg-brass-100 text-brass-600" },
  late: { label: "late", cls: "border-oxide-500/40 bg-oxide-100 text-oxide-700" },
  scrapped: { label: "scrapped", cls: "border-soot-300 bg-soot-100 text-soot-600" },
};

function days(minutes: number): string {
  const d = Math.abs(minutes) / 1440;
  if (d >= 1) return `${d.toFixed(d >= 10 ? 0 : 1)} d`;
  return `${Math.round(Math.abs(minutes) / 60)} h`;
}

/** On time / at risk / late, always as a word, with the projected end and the slack. */
export function ProjectionBadge({ projection }: ProjectionBadgeProps) {
  if (!projection) return <span className="text-xs text-soot-500">no units</span>;
  const s = STYLES[projection.status] ?? STYLES.on_time;
  const end = projection.projected_end ? new Date(projection.projected_end) : null;
  return (
    <span className="inline-flex flex-col">
      <span className={`inline-block w-fit rounded-full border px-2 py-0.5 text-2xs font-semibold uppercase tracking-wide ${s.cls}`} data-projection={projection.status}>
        {s.label}
      </span>
      {end ? (
        <span className="mt-0.5 text-2xs text-soot-500">
          {end.toLocaleDateString(undefined, { day: "numeric", month: "short" })}
          {projection.slack_minutes !== null ? ` · ${projection.slack_minutes < 0 ? `${days(projection.slack_minutes)} over` : `${days(projection.slack_minutes)} spare`}` : ""}
        </span>
      ) : null}
    </span>
  );
}
