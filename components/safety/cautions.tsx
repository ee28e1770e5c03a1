// The usual cautions for wash and furnace work, in one place so every page says the same.
// Hearth plans work; it controls no equipment, and it does not replace the people, procedures
// and codes that keep a shop safe.

export type CautionsProps = {
  /** Which work the page is about. */
  topic: "wash" | "furnace" | "both";
  /** Start folded (the board); the run and wash pages show them open. */
  folded?: boolean;
};

type Caution = { key: string; title: string; text: string; topics: Array<"wash" | "furnace"> };

const CAUTIONS: Caution[] = [
  {
    key: "hot",
    title: "Hot surfaces and loads",
    text: "Furnace walls, doors, trays, setters and parts stay hot long after the program ends. Unload only when the furnace says the load is below its safe handling temperature, with heat-resistant gloves and tools.",
    topics: ["furnace"],
  },
  {
    key: "gas",
    title: "Process gases",
    text: "Hydrogen and hydrogen-bearing mixtures are flammable; argon and nitrogen displace oxygen and can suffocate without warning. Keep gas detection, ventilation and leak checks as the installation requires, and never enter or lean into a chamber or pit that has held process gas.",
    topics: ["furnace"],
  },
  {
    key: "purge",
    title: "Purge before heating",
    text: "The chamber is purged of air before it heats and of flammable gas before it is opened, as the furnace maker's procedure sets out. Do not bypass interlocks or shorten a purge to save time.",
    topics: ["furnace"],
  },
  {
    key: "solvent",
    title: "Flammable solvent vapours",
    text: "Debinding solvents give off flammable vapours. Keep ignition sources away, keep the wash closed while it runs, let parts drip and dry in the ventilated area, and store solvent and used solvent as the safety data sheet directs.",
    topics: ["wash"],
  },
  {
    key: "ppe",
    title: "Ventilation and protective equipment",
    text: "Work with extraction running. Wear the eye protection, gloves and respiratory protection the safety data sheets and the shop's assessment call for, for solvent, binder fumes and furnace work alike.",
    topics: ["wash", "furnace"],
  },
  {
    key: "dust",
    title: "Combustible metal dust",
    text: "Grinding, machining and cleaning sintered or brown parts makes fine metal dust that can burn or explode. Collect it with equipment meant for combustible metal dust, keep surfaces clean and keep it away from water-reactive or ignition hazards.",
    topics: ["wash", "furnace"],
  },
];

export function Cautions({ topic, folded = false }: CautionsProps) {
  const items = CAUTIONS.filter((c) => topic === "both" || c.topics.includes(topic));
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
        See NFPA 86, <cite>Standard for Ovens and Furnaces</cite>, and NFPA 484, <cite>Standard for Combustible Metals</cite>. The
        equipment maker&apos;s instructions, local codes and licensed practice come first. Hearth plans the work; it does not control
        or monitor any equipment.
      </p>
    </div>
  );
  return (
    <section aria-label="Safety cautions" data-testid="cautions" className="rounded-card border border-oxide-500/30 bg-oxide-100/40 px-4 py-3">
      {folded ? (
        <details>
          <summary className="cursor-pointer text-sm font-semibold text-oxide-700">
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
