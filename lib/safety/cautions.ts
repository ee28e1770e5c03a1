// The usual cautions for wash and furnace work: the one copy that the pages
// (components/safety/cautions.tsx) and the printed run sheet (lib/pdf/run-sheet.ts) both show.
// Hearth plans work; it controls no equipment, and it does not replace the people, procedures
// and codes that keep a shop safe.

export type CautionTopic = "wash" | "furnace";

export type Caution = { key: string; title: string; text: string; topics: CautionTopic[] };

export const CAUTIONS: Caution[] = [
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

/** The cautions for one kind of work, in the order above. */
export function cautionsFor(topic: CautionTopic | "both"): Caution[] {
  return CAUTIONS.filter((c) => topic === "both" || c.topics.includes(topic));
}

/** Which standards and whose word come first: printed under the cautions wherever they appear. */
export const CAUTION_DEFERENCE = {
  standards: "See NFPA 86, Standard for Ovens and Furnaces, and NFPA 484, Standard for Combustible Metals.",
  precedence: "The equipment maker's instructions, local codes and licensed practice come first. Hearth plans the work; it does not control or monitor any equipment.",
} as const;
