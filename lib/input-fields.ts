// Building blocks shared by every lib/<domain>/schemas.ts: values the database can store, refused
// with a field and a reason at the boundary rather than by PostgreSQL later (which would be a
// 500, or at best the central mapping's vaguer answer).
//
// - Text: PostgreSQL's text type cannot hold NUL (0x00) at all (PostgreSQL 15 manual, 8.3
//   "Character Types"), and other C0 control characters in a name or a code only ever come
//   from a careless paste or an attacker. Single-line text refuses all of them; multi-line text
//   (notes) keeps tab, line feed and carriage return.
// - Integers: an int4 column holds -2147483648 to 2147483647 (manual, 8.1.1 "Integer Types").
// - Dates: timestamptz reaches 294276 AD (manual, 8.5 "Date/Time Types"); a shop plans within
//   years, so anything outside 1900-2200 is a typing slip, refused before it reaches the column.
import { z } from "zod";

const SINGLE_LINE = /^[^\u0000-\u001f\u007f]*$/;
const MULTI_LINE = /^[^\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]*$/;
const CONTROL_MESSAGE = "contains a control character (such as NUL) that cannot be stored";
const MULTI_MESSAGE = "contains a control character (such as NUL) that cannot be stored; only tabs and line breaks are allowed";

/** A string of one line: no C0 control characters, no DEL. Chain .trim(), .min(), .max() as usual. */
export const singleLine = (params?: Parameters<typeof z.string>[0]) => z.string(params).regex(SINGLE_LINE, CONTROL_MESSAGE);

/** A string that may span lines (notes): tab, LF and CR allowed, other control characters not. */
export const multiLine = (params?: Parameters<typeof z.string>[0]) => z.string(params).regex(MULTI_LINE, MULTI_MESSAGE);

export const INT4_MAX = 2_147_483_647;

const VERSION_MESSAGE = "the version you loaded is needed (a whole number ≥ 1)";

/** A row's optimistic-concurrency version, as a JSON number: a positive int4. */
export const rowVersionNumber = (message = VERSION_MESSAGE) => z.number({ error: message }).int(message).positive(message).max(INT4_MAX, "that version number is out of range");

/** The same from a form field or a query string (a numeric string is taken). */
export const rowVersion = (message = VERSION_MESSAGE) =>
  z.coerce.number({ error: message }).int(message).positive(message).max(INT4_MAX, "that version number is out of range");

export const MIN_YEAR = 1900;
export const MAX_YEAR = 2200;

/** True for a time within the years a shop can plan in (UTC year). */
export function inPlanningYears(ms: number): boolean {
  if (!Number.isFinite(ms)) return false;
  const y = new Date(ms).getUTCFullYear();
  return y >= MIN_YEAR && y <= MAX_YEAR;
}

export const YEAR_MESSAGE = `a date between the years ${MIN_YEAR} and ${MAX_YEAR}`;

/** An ISO 8601 instant with its offset, within the planning years. */
export const boundedInstant = (message = "a date and time with its offset, e.g. 2027-01-04T06:00:00Z") =>
  z.iso.datetime({ offset: true, error: message }).refine((v) => inPlanningYears(Date.parse(v)), YEAR_MESSAGE);

/** A Date (coerced from a string or a number) within the planning years. */
export const boundedDate = (message = "give a date and time") =>
  z.coerce.date({ error: message }).refine((d) => inPlanningYears(d.getTime()), YEAR_MESSAGE);

/**
 * A calendar day as YYYY-MM-DD (ISO 8601 extended calendar date), real (no 31 April) and within
 * the planning years: for a date column, a day that belongs to no time zone (received, expires).
 */
export const calendarDay = (what = "the date") =>
  z
    .string({ error: `${what} must be a date (YYYY-MM-DD)` })
    .regex(/^\d{4}-\d{2}-\d{2}$/, `${what} must be a date (YYYY-MM-DD)`)
    .refine((d) => {
      const t = Date.parse(`${d}T00:00:00Z`);
      return !Number.isNaN(t) && new Date(t).toISOString().startsWith(d);
    }, `${what} is not a real date`)
    .refine((d) => inPlanningYears(Date.parse(`${d}T00:00:00Z`)), `${what}: ${YEAR_MESSAGE}`);
