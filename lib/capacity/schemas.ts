import { z } from "zod";

// The capacity view's query: a range of local dates in the shop's time zone, both included.

const localDate = z
  .string({ error: "give a date as YYYY-MM-DD" })
  .regex(/^\d{4}-\d{2}-\d{2}$/, "give a date as YYYY-MM-DD")
  .refine((s) => {
    const d = new Date(`${s}T00:00:00Z`);
    return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
  }, "not a calendar date");

/** Long enough for a quarter; longer ranges make day charts unreadable and queries slow. */
export const MAX_RANGE_DAYS = 120;

export const dayDiff = (from: string, to: string) =>
  Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);

export const capacityQuerySchema = z
  .object({ from: localDate, to: localDate })
  .superRefine((v, ctx) => {
    const days = dayDiff(v.from, v.to);
    if (days < 0) ctx.addIssue({ code: "custom", path: ["to"], message: "the range must end on or after its first day" });
    else if (days + 1 > MAX_RANGE_DAYS) ctx.addIssue({ code: "custom", path: ["to"], message: `show at most ${MAX_RANGE_DAYS} days at once` });
  });
export type CapacityQuery = z.infer<typeof capacityQuerySchema>;

export const CSV_TABLES = ["utilization-day", "utilization-week", "wip", "queue", "orders", "throughput"] as const;
export type CsvTable = (typeof CSV_TABLES)[number];

export const capacityExportSchema = z.object({ from: localDate, to: localDate, table: z.enum(CSV_TABLES) }).superRefine((v, ctx) => {
  const r = capacityQuerySchema.safeParse({ from: v.from, to: v.to });
  if (!r.success) for (const issue of r.error.issues) ctx.addIssue({ code: "custom", path: issue.path, message: issue.message });
});

export const RESOURCE_KINDS = ["printer", "wash_station", "furnace"] as const;
export type ResourceKind = (typeof RESOURCE_KINDS)[number];
