import type { UnitSystem } from "@/lib/units";
import type { FinishingCard } from "@/lib/finishing/types";
import { len, ra, stockLen } from "./format";

// What a machinist needs to know before touching the part: finished size, stock left on
// each face, the tolerance (an ISO 286-1 grade read as µm for each size), the Ra target and
// the notes from the drawing.

export type UnitFactsProps = { unit: FinishingCard; units: UnitSystem; compact?: boolean };

const AXES = ["x", "y", "z"] as const;

export function ToleranceText({ unit }: { unit: FinishingCard }) {
  const t = unit.tolerance;
  if (t.kind === "none") return <span className="text-soot-500">none on the drawing</span>;
  if (t.kind === "plus_minus") return <span>± {t.um} µm</span>;
  return (
    <span>
      <span className="font-semibold">{t.grade}</span>
      {" = "}
      {AXES.filter((a) => t.perAxisUm[a] !== undefined)
        .map((a) => `${a.toUpperCase()} ${t.perAxisUm[a]} µm`)
        .join(" · ")}
      {t.beyondTable.length ? ` (${t.beyondTable.join(", ").toUpperCase()} beyond the table)` : ""}
    </span>
  );
}

export function StockTable({ unit, units }: { unit: FinishingCard; units: UnitSystem }) {
  const p = unit.part;
  return (
    <table className="tabular w-full text-xs" aria-label="Stock per face">
      <thead>
        <tr className="text-left text-2xs uppercase tracking-wide text-soot-500">
          <th className="py-0.5 pr-2 font-semibold">Axis</th>
          <th className="py-0.5 pr-2 font-semibold">Finished</th>
          <th className="py-0.5 pr-2 font-semibold">Stock −</th>
          <th className="py-0.5 font-semibold">Stock +</th>
        </tr>
      </thead>
      <tbody>
        {AXES.map((a) => (
          <tr key={a} className="border-t border-soot-100">
            <td className="py-0.5 pr-2 font-semibold">{a.toUpperCase()}</td>
            <td className="py-0.5 pr-2">{len(p[`nominal_${a}_mm`], units)}</td>
            <td className={`py-0.5 pr-2 ${p[`stock_${a}_neg_mm`] ? "" : "text-soot-500"}`}>{stockLen(p[`stock_${a}_neg_mm`], units)}</td>
            <td className={`py-0.5 ${p[`stock_${a}_pos_mm`] ? "" : "text-soot-500"}`}>{stockLen(p[`stock_${a}_pos_mm`], units)}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function UnitFacts({ unit, units, compact }: UnitFactsProps) {
  return (
    <div className={`grid gap-3 ${compact ? "sm:grid-cols-[minmax(0,1fr)_minmax(0,1.1fr)]" : "md:grid-cols-2"}`}>
      <StockTable unit={unit} units={units} />
      <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-xs">
        <dt className="text-soot-500">Tolerance</dt>
        <dd>
          <ToleranceText unit={unit} />
        </dd>
        <dt className="text-soot-500">Target Ra</dt>
        <dd>{ra(unit.part.target_ra_um, units)}</dd>
        <dt className="text-soot-500">Notes</dt>
        <dd className="text-soot-800">{unit.part.finishing_notes || <span className="text-soot-500">none</span>}</dd>
      </dl>
    </div>
  );
}
