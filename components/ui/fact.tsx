export type FactProps = { label: string; value: string; note?: string; testId?: string };

/** One figure of a booking's page (station, wash time, furnace, cycle…) with a line under it. */
export function Fact({ label, value, note, testId }: FactProps) {
  return (
    <div className="rounded-card border border-soot-200 bg-white px-3 py-2 shadow-card">
      <div className="text-2xs text-soot-500">{label}</div>
      <div className="font-display text-base font-semibold text-soot-900" data-testid={testId}>
        {value}
      </div>
      {note ? <div className="text-2xs text-soot-500">{note}</div> : null}
    </div>
  );
}
