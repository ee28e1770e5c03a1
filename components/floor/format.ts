// Display helpers for the floor and the build page: times in the shop's time zone (the floor's
// lanes, labels and messages must all read one clock, whatever zone the browser is in),
// durations in hours and minutes.

import { localDateOf } from "@/lib/process/time-zone";

const formatters = new Map<string, { dt: Intl.DateTimeFormat; t: Intl.DateTimeFormat }>();

function formattersFor(timeZone: string) {
  let f = formatters.get(timeZone);
  if (!f) {
    const clock = { hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone } as const;
    f = {
      dt: new Intl.DateTimeFormat(undefined, { weekday: "short", day: "numeric", month: "short", ...clock }),
      t: new Intl.DateTimeFormat(undefined, clock),
    };
    formatters.set(timeZone, f);
  }
  return f;
}

const sameLocalDay = (a: Date, b: Date, timeZone: string) => {
  const x = localDateOf(a.getTime(), timeZone);
  const y = localDateOf(b.getTime(), timeZone);
  return x.year === y.year && x.month === y.month && x.day === y.day;
};

export function formatSlot(start: string, end: string, timeZone: string): string {
  const { dt, t } = formattersFor(timeZone);
  const s = new Date(start);
  const e = new Date(end);
  return `${dt.format(s)} to ${sameLocalDay(s, e, timeZone) ? t.format(e) : dt.format(e)}`;
}

export function formatWhen(at: string | Date, timeZone: string): string {
  return formattersFor(timeZone).dt.format(typeof at === "string" ? new Date(at) : at);
}

/** A day and month in the shop's zone ("9 Dec"). */
export function formatDay(at: string | Date, timeZone: string): string {
  return new Date(at).toLocaleDateString(undefined, { day: "numeric", month: "short", timeZone });
}

export function minutesLabel(minutes: number): string {
  if (!Number.isFinite(minutes)) return "–";
  const h = Math.floor(minutes / 60);
  const m = Math.round(minutes % 60);
  if (!h) return `${m} min`;
  return m ? `${h} h ${m} min` : `${h} h`;
}
