// Staffed hours for the planners: the shop's weekly pattern in its time zone (the same shape the
// shop settings and the unit projection use). Printing and sintering run unattended, but someone
// has to start a build or load a furnace, so a planned start must fall inside a staffed shift.

import { z } from "zod";
import {
  addLocalDays,
  localDateOf,
  staffedIntervals,
  startOfLocalDay,
  timeZoneSchema,
  weeklyPatternSchema,
} from "@/lib/process/time-zone";

export const staffedHoursSchema = z.object({ pattern: weeklyPatternSchema, timeZone: timeZoneSchema });

export type StaffedHours = z.infer<typeof staffedHoursSchema>;

const CHUNK_DAYS = 56;

/** Staffed intervals [start, end) in UTC ms, expanded lazily as later times are asked for. */
export class StaffedCalendar {
  private starts: number[] = [];
  private ends: number[] = [];
  private nextDay: ReturnType<typeof localDateOf>;
  /** Every shift starting before this instant is known. */
  private knownTo = Number.NEGATIVE_INFINITY;
  private chunks = 0;

  constructor(
    readonly staffing: StaffedHours,
    from: number,
  ) {
    // From the day before: an overnight shift may still be running at `from`.
    this.nextDay = addLocalDays(localDateOf(from, staffing.timeZone), -1);
    this.expand();
  }

  private expand(): void {
    // A pattern always has a shift within any week, so this only guards against a bug.
    if (++this.chunks > 1000) throw new Error("internal: staffed calendar expanded too far");
    const intervals = staffedIntervals(this.nextDay, CHUNK_DAYS, this.staffing.pattern, this.staffing.timeZone);
    for (const [s, e] of intervals) {
      const last = this.ends.length - 1;
      if (last >= 0 && s <= this.ends[last]) {
        this.ends[last] = Math.max(this.ends[last], e);
      } else {
        this.starts.push(s);
        this.ends.push(e);
      }
    }
    this.nextDay = addLocalDays(this.nextDay, CHUNK_DAYS);
    // Shifts of days not yet expanded begin at or after that day's local midnight.
    this.knownTo = startOfLocalDay(this.nextDay, this.staffing.timeZone);
  }

  /** Earliest instant ≥ t at which a build may start or a furnace be loaded. */
  nextStart(t: number): number {
    for (;;) {
      let lo = 0;
      let hi = this.starts.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (this.ends[mid] <= t) lo = mid + 1;
        else hi = mid;
      }
      // Only trust an answer that lies within the expanded range.
      if (lo < this.starts.length && Math.max(t, this.starts[lo]) < this.knownTo) return Math.max(t, this.starts[lo]);
      this.expand();
    }
  }

  /** The instant `ms` of staffed time after `t` has been worked (a shift's gaps are skipped). */
  addWork(t: number, ms: number): number {
    if (ms <= 0) return t;
    let left = ms;
    for (;;) {
      const s = this.nextStart(t);
      const i = this.indexOf(s);
      const e = this.ends[i];
      if (e - s >= left) return s + left;
      left -= e - s;
      t = e;
    }
  }

  private indexOf(start: number): number {
    let lo = 0;
    let hi = this.starts.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (this.ends[mid] <= start) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  }

  isStaffed(t: number): boolean {
    return this.nextStart(t) === t;
  }
}
