// The week the floor opens on, and the early request for it.
//
// The floor's first paint waits on two things that need not wait on each other: the page's
// scripts starting (about a second on a small machine) and the window's bookings. So the page
// carries a few lines of plain script, run while the HTML is still being read, that ask for the
// opening week at once; the board takes that answer if it is for the window it shows and still
// fresh, and asks again otherwise (a 401 or any error, a client-side navigation, a stale answer).

export type FloorRange = { from: string; to: string };

export const floorUrl = (r: FloorRange) => `/api/floor?from=${encodeURIComponent(r.from)}&to=${encodeURIComponent(r.to)}`;

/** Sunday to Sunday in browser time, as FullCalendar's week view (firstDay 0) shows it. */
export function openingWeek(now = new Date()): FloorRange {
  const start = new Date(now.getFullYear(), now.getMonth(), now.getDate() - now.getDay());
  const end = new Date(start.getFullYear(), start.getMonth(), start.getDate() + 7);
  return { from: start.toISOString(), to: end.toISOString() };
}

const GLOBAL = "__hearthFloorOpening";

/** The User Timing mark the board sets when its first window's data is in hand. */
export const FLOOR_DATA_MARK = "hearth:floor-data";
const MAX_AGE_MS = 10_000;

type Opening = { url: string; at: number; data: Promise<unknown> };

/**
 * The inline script: the same week and address as openingWeek and floorUrl (a test runs both
 * side by side), written as plain ES2017 for the browser to run before any bundle arrives.
 */
export const OPENING_FETCH_SCRIPT = `(function(){try{
var n=new Date(),s=new Date(n.getFullYear(),n.getMonth(),n.getDate()-n.getDay()),e=new Date(s.getFullYear(),s.getMonth(),s.getDate()+7);
var u="/api/floor?from="+encodeURIComponent(s.toISOString())+"&to="+encodeURIComponent(e.toISOString());
window.${GLOBAL}={url:u,at:Date.now(),data:fetch(u,{credentials:"same-origin",cache:"no-store"}).then(function(r){return r.ok?r.json():null}).catch(function(){return null})};
}catch(x){}})();`;

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
