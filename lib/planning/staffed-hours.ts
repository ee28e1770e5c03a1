// Staffed hours: a weekly pattern in the shop's time zone. Printing runs unattended, but someone
// has to start a build, so a planned start must fall inside a staffed window.

import { z } from "zod";

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$|^24:00$/, "HH:MM, 00:00 to 24:00");

function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en-US", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

export const staffedWindowSchema = z
  .object({
    /** ISO weekday: 1 = Monday … 7 = Sunday. */
    day: z.number().int().min(1).max(7),
    start: hhmm,
    end: hhmm,
  })
  .refine((w) => minutesOf(w.end) > minutesOf(w.start), { message: "a staffed window must end after it starts" });

export const staffedHoursSchema = z.object({
  time_zone: z.string().default("UTC").refine(isTimeZone, { message: "unknown IANA time zone" }),
  windows: z.array(staffedWindowSchema).min(1),
});

export type StaffedHours = z.infer<typeof staffedHoursSchema>;

function minutesOf(hm: string): number {
  const [h, m] = hm.split(":").map(Number);
  return h * 60 + m;
}

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatter(tz: string): Intl.DateTimeFormat {
  let f = formatters.get(tz);
  if (!f) {
    f = new Intl.DateTimeFormat("en-US", {
      timeZone: tz,
      hourCycle: "h23",
      year: "numeric",
      month: "numeric",
      day: "numeric",
      hour: "numeric",
      minute: "numeric",
      second: "numeric",
    });
    formatters.set(tz, f);
  }
  return f;
}

function localParts(t: number, tz: string): { y: number; mo: number; d: number; h: number; mi: number; s: number } {
  const parts: Record<string, number> = {};
  for (const p of formatter(tz).formatToParts(new Date(t))) {
    if (p.type !== "literal") parts[p.type] = Number(p.value);
  }
  return { y: parts.year, mo: parts.month, d: parts.day, h: parts.hour, mi: parts.minute, s: parts.second };
}

/** Offset local − UTC in ms at instant t. */
function offsetAt(t: number, tz: string): number {
  const p = localParts(t, tz);
  return Date.UTC(p.y, p.mo - 1, p.d, p.h, p.mi, p.s) - Math.floor(t / 1000) * 1000;
}

/** UTC instant of a local wall-clock time; a time skipped by a DST jump maps to just after it. */
export function localToUtc(y: number, mo: number, d: number, minutes: number, tz: string): number {
  const guess = Date.UTC(y, mo - 1, d, 0, minutes);
  const o1 = offsetAt(guess, tz);
  const t = guess - o1;
  const o2 = offsetAt(t, tz);
  return o2 === o1 ? t : guess - o2;
}

const DAY_MS = 86_400_000;

/** Staffed intervals [start, end) in UTC ms, expanded lazily as later times are asked for. */
export class StaffedCalendar {
  private starts: number[] = [];
  private ends: number[] = [];
  private expandedTo: number;
  private readonly origin: { y: number; mo: number; d: number };
  private nextDay = -1;

  constructor(
    readonly pattern: StaffedHours,
    from: number,
  ) {
    const p = localParts(from, pattern.time_zone);
    this.origin = { y: p.y, mo: p.mo, d: p.d };
    this.expandedTo = Number.NEGATIVE_INFINITY;
    this.expandDays(8 * 7 + 2);
  }

  private expandDays(n: number): void {
    const tz = this.pattern.time_zone;
    for (let k = 0; k < n; k++, this.nextDay++) {
      const date = new Date(Date.UTC(this.origin.y, this.origin.mo - 1, this.origin.d + this.nextDay));
      const y = date.getUTCFullYear();
      const mo = date.getUTCMonth() + 1;
      const d = date.getUTCDate();
      const weekday = ((date.getUTCDay() + 6) % 7) + 1;
      const todays = this.pattern.windows
        .filter((w) => w.day === weekday)
        .map((w) => [localToUtc(y, mo, d, minutesOf(w.start), tz), localToUtc(y, mo, d, minutesOf(w.end), tz)] as const)
        .sort((a, b) => a[0] - b[0]);
      for (const [s, e] of todays) {
        if (e <= s) continue;
        const last = this.ends.length - 1;
        if (last >= 0 && s <= this.ends[last]) {
          this.ends[last] = Math.max(this.ends[last], e);
        } else {
          this.starts.push(s);
          this.ends.push(e);
        }
      }
      // Everything before the start of the next local day is now known.
      this.expandedTo = localToUtc(y, mo, d + 1, 0, tz);
    }
  }

  /** Earliest instant ≥ t at which a build may start. */
  nextStart(t: number): number {
    while (t >= this.expandedTo - DAY_MS) this.expandDays(8 * 7);
    let lo = 0;
    let hi = this.starts.length;
    // First interval whose end is after t.
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.ends[mid] <= t) lo = mid + 1;
      else hi = mid;
    }
    if (lo === this.starts.length) {
      this.expandDays(8 * 7);
      return this.nextStart(t);
    }
    return Math.max(t, this.starts[lo]);
  }

  isStaffed(t: number): boolean {
    return this.nextStart(t) === t;
  }
}
