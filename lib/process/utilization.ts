import { z } from "zod";
import { ComputationError } from "@/lib/errors";
import { parseInput } from "@/lib/process/validate";
import {
  addLocalDays,
  formatLocalDate,
  localDateOf,
  startOfLocalDay,
  timeZoneSchema,
  weekdayOf,
  type LocalDate,
} from "@/lib/process/time-zone";

// Utilization = busy hours / available hours per resource and per local day or week.
// Available time is the period minus maintenance; busy time is booked time outside
// maintenance. Bookings of one resource never overlap (the database forbids it), so an
// overlap here means the input is wrong, not that the resource did two things at once.

const dateSchema = z.date().refine((d) => !Number.isNaN(d.getTime()), "an invalid date");
const intervalSchema = z
  .object({ start: dateSchema, end: dateSchema, id: z.string().optional() })
  .refine((i) => i.start.getTime() < i.end.getTime(), "an interval must end after it starts");

export const utilizationInputSchema = z
  .object({
    from: dateSchema,
    to: dateSchema,
    timeZone: timeZoneSchema,
    period: z.enum(["day", "week"]),
    /** First day of a week, 0 = Sunday; Monday by default (ISO 8601). */
    weekStartsOn: z.number().int().min(0).max(6).default(1),
    resources: z.array(
      z.object({
        id: z.string(),
        bookings: z.array(intervalSchema).default([]),
        maintenance: z.array(intervalSchema).default([]),
      }),
    ),
  })
  .refine((i) => i.from.getTime() < i.to.getTime(), { message: "the window must end after it starts", path: ["to"] });
export type UtilizationInput = z.input<typeof utilizationInputSchema>;

export type PeriodUtilization = {
  /** Local date the period starts on (YYYY-MM-DD). */
  label: string;
  start: Date;
  end: Date;
  availableHours: number;
  busyHours: number;
  maintenanceHours: number;
  /** busy / available; null when maintenance took the whole period. */
  utilization: number | null;
};

export type ResourceUtilization = {
  resourceId: string;
  periods: PeriodUtilization[];
  total: Omit<PeriodUtilization, "label">;
};

type Span = [number, number];

function mergeSpans(spans: Span[]): Span[] {
  const sorted = [...spans].sort((a, b) => a[0] - b[0]);
  const out: Span[] = [];
  for (const s of sorted) {
    const last = out[out.length - 1];
    if (last && s[0] <= last[1]) last[1] = Math.max(last[1], s[1]);
    else out.push([s[0], s[1]]);
  }
  return out;
}

const overlap = (a: Span, b: Span) => Math.max(0, Math.min(a[1], b[1]) - Math.max(a[0], b[0]));

function sumOverlap(spans: Span[], window: Span): number {
  let total = 0;
  for (const s of spans) total += overlap(s, window);
  return total;
}

/** Period boundaries (local midnights) covering [from, to), clipped to the window. */
function periodSpans(from: number, to: number, timeZone: string, period: "day" | "week", weekStartsOn: number) {
  let date: LocalDate = localDateOf(from, timeZone);
  if (period === "week") date = addLocalDays(date, -((weekdayOf(date) - weekStartsOn + 7) % 7));
  const step = period === "day" ? 1 : 7;
  const spans: Array<{ label: string; span: Span }> = [];
  for (;;) {
    const start = startOfLocalDay(date, timeZone);
    if (start >= to) break;
    const nextDate = addLocalDays(date, step);
    const end = startOfLocalDay(nextDate, timeZone);
    const clipped: Span = [Math.max(start, from), Math.min(end, to)];
    if (clipped[1] > clipped[0]) spans.push({ label: formatLocalDate(date), span: clipped });
    date = nextDate;
  }
  return spans;
}

const HOUR = 3_600_000;

export function utilization(input: UtilizationInput): ResourceUtilization[] {
  const p = parseInput(utilizationInputSchema, input, "utilization");
  const from = p.from.getTime();
  const to = p.to.getTime();
  const periods = periodSpans(from, to, p.timeZone, p.period, p.weekStartsOn);
  return p.resources.map((resource) => {
    const bookings: Span[] = resource.bookings
      .map((b): Span => [b.start.getTime(), b.end.getTime()])
      .sort((a, b) => a[0] - b[0]);
    for (let i = 1; i < bookings.length; i++) {
      // Touching bookings [a, b) and [b, c) are fine.
      if (bookings[i][0] < bookings[i - 1][1]) {
        throw new ComputationError(
          `resource ${resource.id} has overlapping bookings (${new Date(bookings[i - 1][0]).toISOString()} – ` +
            `${new Date(bookings[i - 1][1]).toISOString()} and one starting ${new Date(bookings[i][0]).toISOString()})`,
          "bookings",
          { resourceId: resource.id },
        );
      }
    }
    const maintenance = mergeSpans(resource.maintenance.map((m): Span => [m.start.getTime(), m.end.getTime()]));
    // Booked time that falls inside maintenance does not count as busy.
    const busyInMaintenance: Span[] = [];
    for (const b of bookings) {
      for (const m of maintenance) {
        const s: Span = [Math.max(b[0], m[0]), Math.min(b[1], m[1])];
        if (s[1] > s[0]) busyInMaintenance.push(s);
      }
    }
    const measure = (window: Span) => {
      const maintenanceMs = sumOverlap(maintenance, window);
      const availableMs = window[1] - window[0] - maintenanceMs;
      const busyMs = sumOverlap(bookings, window) - sumOverlap(busyInMaintenance, window);
      return {
        start: new Date(window[0]),
        end: new Date(window[1]),
        availableHours: availableMs / HOUR,
        busyHours: busyMs / HOUR,
        maintenanceHours: maintenanceMs / HOUR,
        utilization: availableMs > 0 ? busyMs / availableMs : null,
      };
    };
    return {
      resourceId: resource.id,
      periods: periods.map(({ label, span }) => ({ label, ...measure(span) })),
      total: measure([from, to]),
    };
  });
}
