// Which of a page's queries a change touches, by the query's key (and, for a detail page, by
// whether its data names the changed row: a unit page shows its build, wash batch and furnace
// run, so a change to any of them refetches it). Lists refetch on any change of what they list.
import type { Change, ChangeEntity } from "@/lib/live/changes";

type Rule = {
  entities: ReadonlySet<ChangeEntity>;
  detail?: boolean;
  /** A list that shows only some rows of an entity: whether this change may touch it. */
  touches?: (c: Change, data: unknown) => boolean;
};

const FLOOR = new Set<ChangeEntity>(["build", "wash_batch", "furnace_run", "maintenance", "equipment"]);
// A booked or moved build changes nothing on the board: its units arrive there as unit changes.
const BOARD = new Set<ChangeEntity>(["wash_batch", "furnace_run", "unit", "maintenance", "equipment"]);
const ALL = new Set<ChangeEntity>(["build", "wash_batch", "furnace_run", "unit", "inspection", "maintenance", "equipment"]);

/** The first element of a query key → what it listens to. Keys not named here never refetch. */
export const LIVE_QUERIES: Record<string, Rule> = {
  floor: { entities: FLOOR },
  // The draft builds: a change to a build on the list (it was a draft), or one that is a draft
  // now (it joins the list). Moving a booked build from one slot to another touches neither; a
  // change that does not say the build's state (an older database) is heard as before.
  unscheduled: { entities: new Set(["build"]), touches: (c, data) => c.s === undefined || c.s === "draft" || (c.id !== undefined && dataText(data).includes(c.id)) },
  "batches-board": { entities: BOARD },
  finishing: { entities: new Set(["unit", "inspection", "furnace_run"]) },
  "furnace-run": { entities: new Set(["furnace_run", "unit"]), detail: true },
  "wash-batch": { entities: new Set(["wash_batch", "unit"]), detail: true },
  build: { entities: new Set(["build", "unit"]), detail: true },
  trace: { entities: ALL, detail: true },
  "finishing-unit": { entities: ALL, detail: true },
  // Which scheduled builds will find no feedstock: the schedule (builds, their units) against
  // the lots on the shelf and each material's allowances.
  "feedstock-shortfalls": { entities: new Set(["build", "unit", "feedstock_lot", "material"]) },
};

/** Ids of rows the query's data mentions, memoised per data object. */
const mentions = new WeakMap<object, string>();
function dataText(data: unknown): string {
  if (!data || typeof data !== "object") return "";
  let text = mentions.get(data);
  if (text === undefined) {
    try {
      text = JSON.stringify(data);
    } catch {
      text = "";
    }
    mentions.set(data, text);
  }
  return text;
}

/** Whether queryHears looks at the query's data for this key (a detail page, a list of some rows). */
export function queryReadsData(key: readonly unknown[]): boolean {
  const rule = typeof key[0] === "string" ? LIVE_QUERIES[key[0]] : undefined;
  return !!rule && (!!rule.detail || !!rule.touches);
}

/** True when the query should refetch for these changes; null changes means "everything" (a resync). */
export function queryHears(key: readonly unknown[], data: unknown, changes: readonly Change[] | null): boolean {
  const rule = typeof key[0] === "string" ? LIVE_QUERIES[key[0]] : undefined;
  if (!rule) return false;
  if (changes === null) return true;
  return changes.some((c) => {
    if (!rule.entities.has(c.e)) return false;
    if (rule.touches) return rule.touches(c, data);
    if (!rule.detail) return true;
    // The page's own row (its id is the key's second element), or an inspection of its unit.
    if (c.id && c.id === key[1]) return true;
    if (c.unit && c.unit === key[1]) return true;
    return (c.id !== undefined && dataText(data).includes(c.id)) || (c.unit !== undefined && dataText(data).includes(c.unit));
  });
}
