// The week the floor opens on, and the early request for it.
//
// The floor's first paint waits on two things that need not wait on each other: the page's
// scripts starting (about a second on a small machine) and the window's bookings. So the page
// carries a few lines of plain script, run while the HTML is still being read, that ask for the
// opening week at once; the board takes that answer if it is for the window it shows and still
// fresh, and asks again otherwise (a 401 or any error, a client-side navigation, a stale answer).

import { addLocalDays, localDateOf, startOfLocalDay, weekdayOf, zonedParts } from "@/lib/process/time-zone";

export type FloorRange = { from: string; to: string };

export const floorUrl = (r: FloorRange) => `/api/floor?from=${encodeURIComponent(r.from)}&to=${encodeURIComponent(r.to)}`;

/**
 * Sunday 00:00 to the next Sunday 00:00 in the shop's time zone, as FullCalendar's week view
 * (firstDay 0, timeZone set to the shop's) shows it, whatever zone the browser is in.
 */
export function openingWeek(timeZone: string, now = new Date()): FloorRange {
  const today = localDateOf(now.getTime(), timeZone);
  const sunday = addLocalDays(today, -weekdayOf(today));
  const at = (ms: number) => new Date(ms).toISOString();
  return { from: at(startOfLocalDay(sunday, timeZone)), to: at(startOfLocalDay(addLocalDays(sunday, 7), timeZone)) };
}

/**
 * Where the phone's one-day timeline opens: the hour before now on the shop's clock, so a
 * technician sees the running builds and the next hours rather than midnight. The earliest is
 * 00:00 (the day view starts there).
 */
export function openingScrollTime(timeZone: string, now = new Date()): string {
  const hour = Math.max(0, zonedParts(now.getTime(), timeZone).hour - 1);
  return `${String(hour).padStart(2, "0")}:00:00`;
}

const GLOBAL = "__hearthFloorOpening";

/** The User Timing mark the board sets when its first window's data is in hand. */
export const FLOOR_DATA_MARK = "hearth:floor-data";
const MAX_AGE_MS = 10_000;

type Opening = { url: string; at: number; data: Promise<unknown> };

/**
 * The inline script: the same week and address as openingWeek and floorUrl (a test runs both
 * side by side), written as plain ES2017 for the browser to run before any bundle arrives. The
 * week is the shop's: Intl gives the wall clock in its zone, and local midnight is turned into
 * an instant as zonedTimeToUtc does (lib/process/time-zone.ts), the earlier of an ambiguous
 * pair and past a gap.
 */
export function openingFetchScript(timeZone: string): string {
  // JSON with "<" escaped: a string literal that cannot end the script element.
  const zone = JSON.stringify(timeZone).replace(/</g, "\\u003c");
  return `(function(){try{
var f=new Intl.DateTimeFormat("en-US",{timeZone:${zone},hourCycle:"h23",year:"numeric",month:"numeric",day:"numeric",hour:"numeric",minute:"numeric",second:"numeric"});
function p(t){var o={};f.formatToParts(new Date(t)).forEach(function(x){o[x.type]=Number(x.value)});return o}
function off(t){var q=p(t);return Date.UTC(q.year,q.month-1,q.day,q.hour%24,q.minute,q.second)-Math.floor(t/1e3)*1e3}
function utc(w){var b=off(w-864e5),a=off(w+864e5),r=[w-b,w-a].filter(function(u){return w-off(u)===u});return new Date(r.length?Math.min.apply(null,r):w-b).toISOString()}
var n=p(Date.now()),k=new Date(Date.UTC(n.year,n.month-1,n.day)).getUTCDay(),s=Date.UTC(n.year,n.month-1,n.day-k),e=Date.UTC(n.year,n.month-1,n.day-k+7);
var u="/api/floor?from="+encodeURIComponent(utc(s))+"&to="+encodeURIComponent(utc(e));
window.${GLOBAL}={url:u,at:Date.now(),data:fetch(u,{credentials:"same-origin",cache:"no-store"}).then(function(r){return r.ok?r.json():null}).catch(function(){return null})};
}catch(x){}})();`;
}

/**
 * The early answer for this address, once: null when there is none, it is for another window or
 * it is too old. Resolves to null when the early request failed, so that the caller asks itself.
 */
export function takeOpeningFetch<T>(url: string, now = Date.now()): Promise<T | null> | null {
  if (typeof window === "undefined") return null;
  const w = window as unknown as Record<string, Opening | undefined>;
  const opening = w[GLOBAL];
  w[GLOBAL] = undefined;
  if (!opening || opening.url !== url || now - opening.at > MAX_AGE_MS) return null;
  return opening.data as Promise<T | null>;
}
