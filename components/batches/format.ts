// Times on the batching pages are shown, and typed, in the shop's time zone.

import { localDateOf, zonedParts, zonedTimeToUtc } from "@/lib/process/time-zone";
import { formatDuration } from "@/lib/units";

export function shopTime(iso: string | null | undefined, timeZone: string, withDay = true): string {
  if (!iso) return "—";
  return new Intl.DateTimeFormat("en-GB", {
    timeZone,
    ...(withDay ? { weekday: "short", day: "numeric", month: "short" } : {}),
    hour: "2-digit",
    minute: "2-digit",
    hourCycle: "h23",
  }).format(new Date(iso));
}

/** The value of a datetime-local input for an instant, in the shop's zone. */
export function toLocalInput(iso: string, timeZone: string): string {
  const p = zonedParts(new Date(iso).getTime(), timeZone);
  const two = (n: number) => String(n).padStart(2, "0");
  return `${p.year}-${two(p.month)}-${two(p.day)}T${two(p.hour)}:${two(p.minute)}`;
}

/** A datetime-local value read as shop time; null when it is not a complete time. */
export function fromLocalInput(value: string, timeZone: string): string | null {
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(value);
  if (!m) return null;
  const [, y, mo, d, h, mi] = m.map(Number);
  return new Date(zonedTimeToUtc({ year: y, month: mo, day: d }, h * 60 + mi, timeZone)).toISOString();
}

export function duration(minutes: number | null | undefined): string {
  return minutes === null || minutes === undefined || !Number.isFinite(minutes) || minutes < 0 ? "—" : formatDuration(minutes);
}

/** "2 d late", "6 h spare". */
export function slackWords(minutes: number): string {
  const abs = Math.abs(minutes);
  const text = abs >= 2880 ? `${Math.round(abs / 1440)} d` : abs >= 120 ? `${Math.round(abs / 60)} h` : `${Math.round(abs)} min`;
  return minutes < 0 ? `${text} late` : `${text} spare`;
}

export const dayOf = (iso: string, timeZone: string) => {
  const d = localDateOf(new Date(iso).getTime(), timeZone);
  return `${d.year}-${String(d.month).padStart(2, "0")}-${String(d.day).padStart(2, "0")}`;
};

/** Masses to the tenth of a gram below a kilogram, then kilograms to 10 g (pounds for inch users). */
export function massText(g: number, unitPref: "mm" | "in"): string {
  if (unitPref === "in") return `${(g / 453.59237).toFixed(g < 453.59237 ? 3 : 2)} lb`;
  return g < 1000 ? `${g.toFixed(1)} g` : `${(g / 1000).toFixed(2)} kg`;
}
