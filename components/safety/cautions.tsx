// The usual cautions for wash and furnace work on a page; their words live in lib/safety/cautions.ts,
// which the printed run sheet reads too, so paper and screen say the same.

import { CAUTION_DEFERENCE, cautionsFor } from "@/lib/safety/cautions";

export type CautionsProps = {
  /** Which work the page is about. */
  topic: "wash" | "furnace" | "both";
  /** Start folded (the board); the run and wash pages show them open. */
  folded?: boolean;
};

export function Cautions({ topic, folded = false }: CautionsProps) {
  const items = cautionsFor(topic);
  const body = (
    <div className="mt-2 space-y-3">
      <ul className="grid grid-cols-1 gap-x-6 gap-y-2 sm:grid-cols-2">
        {items.map((c) => (
          <li key={c.key} data-caution={c.key} className="text-sm leading-snug text-soot-700">
            <span className="font-semibold text-oxide-700">{c.title}. </span>
            {c.text}
          </li>
        ))}
      </ul>
      <p className="text-xs leading-snug text-soot-600">
        See NFPA 86, <cite>Standard for Ovens and Furnaces</cite>, and NFPA 484, <cite>Standard for Combustible Metals</cite>.{" "}
        {CAUTION_DEFERENCE.precedence}
      </p>
    </div>
  );
  return (
    <section id="safety-cautions" aria-label="Safety cautions" data-testid="cautions" className="rounded-card border border-oxide-500/30 bg-oxide-100/40 px-4 py-3">
      {folded ? (
        <details>
          <summary className="tap-target cursor-pointer py-2 text-sm font-semibold text-oxide-700">
            Safety: hot loads, process gases, solvent vapours, metal dust (NFPA 86, NFPA 484)
          </summary>
          {body}
        </details>
      ) : (
        <>
          <h2 className="text-sm font-semibold text-oxide-700">Safety</h2>
          {body}
        </>
      )}
    </section>
  );
}

const SHORT: Record<CautionsProps["topic"], string> = {
  furnace: "hot loads, process gases and metal dust",
  wash: "flammable solvent vapours and metal dust",
  both: "hot loads, process gases, solvent vapours and metal dust",
};

/**
 * A page of work at a furnace or a wash station: on a phone the full cautions would fill the first
 * screen and push the operator's next action below it, so there a one-line caution leads and the
 * full list follows the work (moved by CSS order only: it stays on the page, in reading order
 * first for a screen reader, and has no controls whose focus order could change). From the md
 * breakpoint up the full list leads, as before.
 */
export function CautionsAroundWork({ topic, children }: { topic: CautionsProps["topic"]; children: React.ReactNode }) {
  return (
    <div className="flex flex-col gap-4">
      <p className="rounded-card border border-oxide-500/30 bg-oxide-100/40 px-3 py-2 text-sm leading-snug text-soot-800 md:hidden" data-testid="caution-line">
        <span className="font-semibold text-oxide-700">Safety: </span>
        {SHORT[topic]}. The maker&apos;s instructions, local codes, NFPA 86, NFPA 484 and licensed practice come first.{" "}
        <a href="#safety-cautions" className="tap-target inline-flex items-center font-semibold text-oxide-700 underline">
          All cautions below
        </a>
      </p>
      <div className="max-md:order-last">
        <Cautions topic={topic} />
      </div>
      {children}
    </div>
  );
}
