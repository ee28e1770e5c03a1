import { formatMoney } from "@/lib/quotes/money";
import type { CostFigure } from "@/lib/quotes/cost";

export type CostTableProps = { figures: CostFigure[]; currency: string; minorDigits: number };

/** Each figure with its formula and inputs behind a details element (keyboard and touch open it). */
export function CostTable({ figures, currency, minorDigits }: CostTableProps) {
  return (
    <ul className="min-w-0 divide-y divide-soot-100 text-sm" data-testid="cost-figures">
      {figures.map((f) => {
        const strong = f.key === "subtotal" || f.key === "total";
        return (
          <li key={f.key} data-figure={f.key}>
            <details className="group px-1 py-1.5">
              <summary className="tap-target flex cursor-pointer list-none items-center justify-between gap-3 rounded px-1 py-1 hover:bg-soot-50">
                <span className={strong ? "font-semibold" : ""}>
                  <span aria-hidden className="mr-1 inline-block text-soot-400 group-open:rotate-90">›</span>
                  {f.label}
                </span>
                <span className={`tabular ${strong ? "font-semibold" : ""}`} data-minor={f.minor}>{formatMoney(f.minor, currency, minorDigits)}</span>
              </summary>
              <div className="mt-1 space-y-1 rounded-md bg-soot-50 px-3 py-2 text-xs text-soot-700">
                <p className="break-words font-mono">{f.formula}</p>
                {Object.keys(f.inputs).length ? (
                  <dl className="grid grid-cols-[minmax(0,9rem)_minmax(0,1fr)] gap-x-3 gap-y-0.5">
                    {Object.entries(f.inputs).map(([k, v]) => (
                      <div key={k} className="contents">
                        <dt className="break-words text-soot-500">{k.replaceAll("_", " ")}</dt>
                        <dd className="tabular break-words">{String(v)}</dd>
                      </div>
                    ))}
                  </dl>
                ) : null}
                <p className="text-soot-500">Rounded once to whole minor units, halves up.</p>
              </div>
            </details>
          </li>
        );
      })}
    </ul>
  );
}
