// The machinists' queue as a promise sees it: units already out of the furnace wait now; units
// in a booked furnace run are released when the run is unloaded (the next staffed instant after
// it ends), the same release a quoted lot gets (lib/quotes/promise.ts). No lead time is added:
// the queue and each unit's own work are what stand between unloading and done. Units whose run
// is not booked yet have no release time and are left out: they will queue behind a promise
// made today. Held units are not worked and are left out as well.

import { StaffedCalendar, type StaffedHours } from "@/lib/planning/staffed-hours";
import type { FinishingJob } from "./promise";

export type QueuedUnit = {
  /** Out of the furnace (sintered, ready for or in finishing): released already. */
  released: boolean;
  /** End of the booked furnace run the unit is in (ms), when not released yet. */
  run_ends_at: number | null;
  /** Machinist-minutes this unit takes (lib/quotes/cost finishingMinutesPerUnit). */
  minutes: number;
};

/** Finishing jobs grouped by release instant, in release order. */
export function finishingQueue(units: QueuedUnit[], now: number, staffed: StaffedHours | null): FinishingJob[] {
  const cal = staffed ? new StaffedCalendar(staffed, now) : null;
  const byRelease = new Map<number, number>();
  for (const u of units) {
    if (!(u.minutes > 0)) continue;
    let release: number;
    if (u.released) release = now;
    else if (u.run_ends_at !== null) {
      release = cal ? cal.nextStart(Math.max(u.run_ends_at, now)) : Math.max(u.run_ends_at, now);
    } else continue;
    byRelease.set(release, (byRelease.get(release) ?? 0) + u.minutes);
  }
  return [...byRelease].map(([release, minutes]) => ({ release, minutes })).sort((a, b) => a.release - b.release);
}
