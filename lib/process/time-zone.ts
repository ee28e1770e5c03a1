import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput, requireValidDate } from "@/lib/process/validate";

// Wall-clock arithmetic in the shop's IANA time zone through Intl, without a date library.
// Instants are UTC milliseconds; a local date is { year, month (1–12), day }.

export type LocalDate = { year: number; month: number; day: number };
export type ZonedParts = LocalDate & { hour: number; minute: number; second: number; weekday: number };

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  let f = formatters.get(timeZone);
  if (!f) {
    try {
      f = new Intl.DateTimeFormat("en-US", {
        timeZone,
        hourCycle: "h23",
        year: "numeric",
        month: "numeric",
        day: "numeric",
        hour: "numeric",
        minute: "numeric",
        second: "numeric",
      });
    } catch {
      throw new ComputationError(`"${timeZone}" is not an IANA time zone`, "timeZone");
    }
    formatters.set(timeZone, f);
  }
  return f;
}

export function assertTimeZone(timeZone: string): string {
  formatterFor(timeZone);
  return timeZone;
}

export const timeZoneSchema = z.string().refine((tz) => {
  try {
    formatterFor(tz);
    return true;
  } catch {
    return false;
  }
}, "not an IANA time zone");

/** Local calendar parts of an instant; weekday 0 = Sunday. */
export function zonedParts(instantMs: number, timeZone: string): ZonedParts {
  const parts = formatterFor(timeZone).formatToParts(new Date(instantMs));
  const get = (type: string) => Number(parts.find((p) => p.type === type)!.value);
  const year = get("year");
  const month = get("month");
  const day = get("day");
  return {
    year,
    month,
    day,
    hour: get("hour") % 24,
    minute: get("minute"),
    second: get("second"),
    weekday: new Date(Date.UTC(year, month - 1, day)).getUTCDay(),
  };
}

/** Offset of local time from UTC at an instant, in ms (positive east of Greenwich). */
export function offsetMs(instantMs: number, timeZone: string): number {
  const p = zonedParts(instantMs, timeZone);
  const wholeSecond = Math.floor(instantMs / 1000) * 1000;
  return Date.UTC(p.year, p.month - 1, p.day, p.hour, p.minute, p.second) - wholeSecond;
}

/**
 * The instant a local wall-clock time names. An ambiguous time (clocks going back) gives the
 * earlier instant; a time that does not exist (clocks going forward) is moved on by the gap,
 * so 02:30 on a spring-forward night becomes 03:30.
 */
export function zonedTimeToUtc(date: LocalDate, minutesOfDay: number, timeZone: string): number {
  const wall = Date.UTC(date.year, date.month - 1, date.day) + minutesOfDay * 60_000;
  const before = offsetMs(wall - 86_400_000, timeZone);
  const after = offsetMs(wall + 86_400_000, timeZone);
  const valid = [before, after].map((o) => wall - o).filter((utc) => wall - offsetMs(utc, timeZone) === utc);
  if (valid.length) return Math.min(...valid);
  return wall - before;
}

export function localDateOf(instantMs: number, timeZone: string): LocalDate {
  const { year, month, day } = zonedParts(instantMs, timeZone);
  return { year, month, day };
}

export function addLocalDays(date: LocalDate, days: number): LocalDate {
  const d = new Date(Date.UTC(date.year, date.month - 1, date.day + days));
  return { year: d.getUTCFullYear(), month: d.getUTCMonth() + 1, day: d.getUTCDate() };
}

export const weekdayOf = (date: LocalDate) => new Date(Date.UTC(date.year, date.month - 1, date.day)).getUTCDay();

export const formatLocalDate = (d: LocalDate) =>
  `${String(d.year).padStart(4, "0")}-${String(d.month).padStart(2, "0")}-${String(d.day).padStart(2, "0")}`;

/** Local midnight starting the day, as an instant. */
export const startOfLocalDay = (date: LocalDate, timeZone: string) => zonedTimeToUtc(date, 0, timeZone);

// Staffed hours -------------------------------------------------------------------------------

const clockSchema = z
  .string()
  .regex(/^([01]\d|2[0-3]):[0-5]\d$|^24:00$/, 'a time of day is written "HH:MM" (00:00–24:00)');

/** One shift: day 0 = Sunday; an end at or before the start runs past midnight. */
export const shiftSchema = z
  .object({ day: z.number().int().min(0).max(6), start: clockSchema, end: clockSchema })
  .refine((s) => s.start !== s.end, "a shift must not start and end at the same time");
export const weeklyPatternSchema = z.array(shiftSchema).min(1, "no staffed hours are set");
export type Shift = z.infer<typeof shiftSchema>;
export type WeeklyPattern = Shift[];

const minutesOf = (clock: string) => Number(clock.slice(0, 2)) * 60 + Number(clock.slice(3, 5));

/**
 * Intervals already worked out, by everything they depend on. The batching board projects every
 * waiting unit (nextStaffedTime: ten days of shifts, each end found through a few Intl lookups),
 * and a shop's thousands of units ask for the same few days: the Intl calls took most of the
 * board's load. The answer is a function of its arguments alone, so a kept one is exact.
 */
const intervalMemo = new Map<string, ReadonlyArray<readonly [number, number]>>();
const INTERVAL_MEMO_MAX = 1_000;

/** The staffed intervals [start, end) in UTC ms of shifts that begin on local days [from, from + days). */
export function staffedIntervals(
  fromDate: LocalDate,
  days: number,
  pattern: WeeklyPattern,
  timeZone: string,
): Array<[number, number]> {
  const key = `${timeZone}|${fromDate.year}-${fromDate.month}-${fromDate.day}|${days}|${JSON.stringify(pattern)}`;
  const kept = intervalMemo.get(key);
  if (kept) return kept.map(([s, e]) => [s, e]);
  const intervals = computeStaffedIntervals(fromDate, days, pattern, timeZone);
  if (intervalMemo.size >= INTERVAL_MEMO_MAX) intervalMemo.clear();
  intervalMemo.set(key, intervals.map(([s, e]) => [s, e] as const));
  return intervals;
}

function computeStaffedIntervals(fromDate: LocalDate, days: number, pattern: WeeklyPattern, timeZone: string): Array<[number, number]> {
  const shifts = parseInput(weeklyPatternSchema, pattern, "staffed hours");
  assertTimeZone(timeZone);
  const intervals: Array<[number, number]> = [];
  for (let k = 0; k < days; k++) {
    const date = addLocalDays(fromDate, k);
    const weekday = weekdayOf(date);
    for (const shift of shifts) {
      if (shift.day !== weekday) continue;
      const startMin = minutesOf(shift.start);
      const endMin = minutesOf(shift.end);
      const start = zonedTimeToUtc(date, startMin, timeZone);
      const end =
        endMin > startMin
          ? zonedTimeToUtc(endMin === 1440 ? addLocalDays(date, 1) : date, endMin % 1440, timeZone)
          : zonedTimeToUtc(addLocalDays(date, 1), endMin, timeZone);
      if (end > start) intervals.push([start, end]);
    }
  }
  return intervals.sort((a, b) => a[0] - b[0]);
}

/**
 * The earliest instant at or after `t` inside staffed hours: `t` itself when someone is on
 * shift, else the start of the next shift.
 */
export function nextStaffedTime(t: Date, weeklyPattern: WeeklyPattern, timeZone: string): Date {
  requireValidDate(t, "t");
  const ms = t.getTime();
  // From the day before (an overnight shift may still be running) to 8 days on (every
  // weekday has come round once, with room for a daylight-saving shift).
  const from = addLocalDays(localDateOf(ms, timeZone), -1);
  let next = Infinity;
  for (const [start, end] of staffedIntervals(from, 10, weeklyPattern, timeZone)) {
    if (start <= ms && ms < end) return new Date(ms);
    if (start > ms && start < next) next = start;
  }
  if (!Number.isFinite(next)) throw new ComputationError("no staffed shift follows this time", "weeklyPattern");
  return new Date(next);
}

export function isStaffed(t: Date, weeklyPattern: WeeklyPattern, timeZone: string): boolean {
  return nextStaffedTime(t, weeklyPattern, timeZone).getTime() === t.getTime();
}
