// The loading checklist a furnace operator ticks before a run may start. Hearth records the
// answers; it controls no equipment, and the furnace maker's procedure always comes first.

export const LOADING_CHECKLIST = [
  { key: "setters_checked", label: "Trays and setters are clean, uncracked and sit flat" },
  { key: "layout_matches", label: "Parts stand where the tray drawing puts them, clearance kept, none touching" },
  { key: "load_within_limit", label: "The load is weighed and within the furnace's limit" },
  { key: "thermocouples_ok", label: "Thermocouples are in place and reading" },
  { key: "gas_supply_checked", label: "Process gas supply, flow and exhaust are checked as the maker's instructions require" },
  { key: "purge_confirmed", label: "The program purges the chamber before heating" },
  { key: "door_sealed", label: "Door seal is clean, the door is closed and latched" },
] as const;

export type ChecklistKey = (typeof LOADING_CHECKLIST)[number]["key"];

export const CHECKLIST_KEYS = LOADING_CHECKLIST.map((c) => c.key) as [ChecklistKey, ...ChecklistKey[]];

/** Items still unticked. */
export function missingChecks(answers: Partial<Record<string, boolean>>): ChecklistKey[] {
  return CHECKLIST_KEYS.filter((k) => answers[k] !== true);
}
