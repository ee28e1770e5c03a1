import { formatLength, formatRa, type UnitSystem } from "@/lib/units";

// Display helpers: times in the shop's time zone (where the work happens), lengths and Ra in
// the person's own unit system.

const formatters = new Map<string, Intl.DateTimeFormat>();
function fmt(timeZone: string, kind: "when" | "day" | "time") {
  const key = `${timeZone}|${kind}`;
  let f = formatters.get(key);
  if (!f) {
    const opts: Intl.DateTimeFormatOptions =
      kind === "when"
        ? { weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone }
        : kind === "day"
          ? { weekday: "short", day: "numeric", month: "short", year: "numeric", timeZone }
          : { hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone };
    f = new Intl.DateTimeFormat("en-GB", opts);
    formatters.set(key, f);
  }
  return f;
}

export const formatWhen = (at: string | Date | null | undefined, timeZone: string) => (at ? fmt(timeZone, "when").format(new Date(at)) : "–");
export const formatDay = (at: string | Date | null | undefined, timeZone: string) => (at ? fmt(timeZone, "day").format(new Date(at)) : "–");

/** "in 5 h", "2 d ago": how far a moment is from now, in words. */
export function relative(at: string | Date, now = Date.now()): string {
  const minutes = (new Date(at).getTime() - now) / 60_000;
  const abs = Math.abs(minutes);
  const text = abs < 60 ? `${Math.round(abs)} min` : abs < 48 * 60 ? `${Math.round(abs / 60)} h` : `${(abs / 1440).toFixed(abs >= 14400 ? 0 : 1)} d`;
  return minutes >= 0 ? `in ${text}` : `${text} ago`;
}

export function slackLabel(minutes: number): string {
  const abs = Math.abs(minutes);
  const text = abs < 48 * 60 ? `${Math.round(abs / 60)} h` : `${(abs / 1440).toFixed(1)} d`;
  return minutes < 0 ? `${text} over` : `${text} spare`;
}

export const len = (mm: number | null | undefined, system: UnitSystem, digits?: number) =>
  mm === null || mm === undefined ? "–" : formatLength(mm, system, digits);

/** Lengths in inches get one more decimal than the default when they are finishing stock. */
export const stockLen = (mm: number, system: UnitSystem) => formatLength(mm, system, system === "in" ? 4 : 2);

export const ra = (um: number | null | undefined, system: UnitSystem) => (um === null || um === undefined ? "–" : formatRa(um, system));

export const stateLabel = (state: string) => state.replaceAll("_", " ");

type StockCheckNumbers = {
  status: "ok" | "warning";
  axis: string;
  eccentricityMm: number;
  requiredPerSideMm: number;
  stockPerSideMm: number;
  shortByMm: number;
  underSize: boolean;
};

/** The runout-against-stock verdict in the reader's own units. */
export function stockCheckText(c: StockCheckNumbers, system: UnitSystem): string {
  const l = (mm: number) => formatLength(mm, system, system === "in" ? 4 : 3);
  const axis = c.axis.toUpperCase();
  if (c.underSize) return `${axis}: as sintered the size is under nominal, so no stock is left to clean up.`;
  if (c.status === "ok") {
    return `${axis}: ${l(c.stockPerSideMm)} per side covers the runout (off centre by ${l(c.eccentricityMm)}) with margin; it should clean up.`;
  }
  return `${axis}: the runout puts the diameter ${l(c.eccentricityMm)} off centre, so it needs more than ${l(c.requiredPerSideMm)} per side; ${l(c.stockPerSideMm)} is ${l(c.shortByMm)} short and the diameter may not clean up.`;
}
