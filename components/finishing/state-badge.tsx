// A unit's state as a word on a tinted ground; the colour only repeats what the word says.

const TONE: Record<string, string> = {
  planned: "border-soot-300 bg-soot-100 text-soot-700",
  printing: "border-slate2-400/50 bg-slate2-100 text-slate2-600",
  green: "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700",
  washing: "border-slate2-400/50 bg-slate2-100 text-slate2-600",
  brown: "border-clay-300 bg-clay-50 text-clay-700",
  sintering: "border-ember-400/60 bg-clay-100 text-clay-800",
  sintered: "border-clay-400/60 bg-clay-100 text-clay-800",
  ready_for_finishing: "border-brass-400/60 bg-brass-100 text-brass-600",
  finishing: "border-slate2-400/60 bg-slate2-100 text-slate2-600",
  done: "border-verdigris-400/50 bg-verdigris-100 text-verdigris-700",
  on_hold: "border-brass-400/60 bg-brass-100 text-brass-600",
  scrapped: "border-oxide-500/40 bg-oxide-100 text-oxide-700",
};

export function StateBadge({ state }: { state: string }) {
  return (
    <span className={`inline-block whitespace-nowrap rounded-full border px-2 py-0.5 text-2xs font-semibold uppercase tracking-wide ${TONE[state] ?? TONE.planned}`} data-state={state}>
      {state.replaceAll("_", " ")}
    </span>
  );
}

const RISK: Record<string, { label: string; cls: string }> = {
  on_time: { label: "on time", cls: "border-verdigris-400/50 bg-verdigris-100 text-verdigris-700" },
  at_risk: { label: "at risk", cls: "border-brass-400/60 bg-brass-100 text-brass-600" },
  late: { label: "late", cls: "border-oxide-500/40 bg-oxide-100 text-oxide-700" },
};

export function RiskBadge({ status }: { status: string }) {
  const s = RISK[status] ?? RISK.on_time;
  return (
    <span className={`inline-block whitespace-nowrap rounded-full border px-2 py-0.5 text-2xs font-semibold uppercase tracking-wide ${s.cls}`} data-risk={status}>
      {s.label}
    </span>
  );
}
