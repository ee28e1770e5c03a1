// Someone has to load a wash and load or unload a furnace, so those moments fall inside the
// shop's staffed hours. A shop that has set no hours is taken as always staffed.

import { nextStaffedTime, weeklyPatternSchema, type WeeklyPattern } from "@/lib/process/time-zone";

export type Staffing = { pattern: WeeklyPattern; timeZone: string } | null;

/** Reads shop_settings.staffed_hours (day 0 = Sunday; a stray 7 is read as Sunday too). */
export function staffingOf(staffedHours: unknown, timeZone: string): Staffing {
  const raw = Array.isArray(staffedHours)
    ? staffedHours.map((s) => (s && typeof s === "object" && (s as { day?: unknown }).day === 7 ? { ...s, day: 0 } : s))
    : [];
  const parsed = weeklyPatternSchema.safeParse(raw);
  return parsed.success ? { pattern: parsed.data, timeZone } : null;
}

export function nextStaffed(t: Date, staffing: Staffing): Date {
  return staffing ? nextStaffedTime(t, staffing.pattern, staffing.timeZone) : t;
}

export function isStaffedAt(t: Date, staffing: Staffing): boolean {
  return nextStaffed(t, staffing).getTime() === t.getTime();
}

/** "Mon 06:00" in the shop's zone, for messages. */
export function formatShopTime(t: Date, timeZone: string): string {
  return new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23" }).format(t);
}
