import { z } from "zod";
import { singleLine } from "@/lib/input-fields";
import type { CsvValue } from "@/lib/csv/safe-cell";

// The shop-wide activity log: the `events` every change records (who, what, when, which record),
// filtered. People's own sign-ins, sessions and role changes (entity "user") are the security
// log's, for admins only (/setup/security), and stay out of this one.

export const ACTIVITY_ENTITIES = {
  order: "Order",
  part: "Part",
  unit: "Unit",
  build: "Build",
  wash_batch: "Wash batch",
  furnace_run: "Furnace run",
  inspection: "Inspection",
  feedstock_lot: "Feedstock lot",
  quote: "Quote",
  material: "Material",
  sinter_profile: "Sinter profile",
  printer: "Printer",
  wash_station: "Wash station",
  furnace: "Furnace",
  api_token: "API token",
  webhook_endpoint: "Webhook endpoint",
  shop_settings: "Shop settings",
} as const;
export type ActivityEntity = keyof typeof ACTIVITY_ENTITIES;

const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, "a date as YYYY-MM-DD")
  .refine((d) => {
    const y = Number(d.slice(0, 4));
    return y >= 1900 && y <= 2200 && !Number.isNaN(Date.parse(`${d}T00:00:00Z`));
  }, "a date between 1900 and 2200");

/** The filters, from a query string: the page, the JSON API and the CSV export take the same ones. */
export const activityFilterSchema = z
  .object({
    entity: z.enum(Object.keys(ACTIVITY_ENTITIES) as [ActivityEntity, ...ActivityEntity[]]).optional(),
    kind: z.string().regex(/^[a-z_]{1,40}$/, "a kind of change such as state or schedule").optional(),
    /** One record: its id. */
    record: z.uuid("a record's id").optional(),
    /** Who: part of a name or an e-mail address. */
    user: singleLine().trim().max(120).optional(),
    from: day.optional(),
    to: day.optional(),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { message: "from must not be after to", path: ["to"] });
export type ActivityFilter = z.output<typeof activityFilterSchema>;

/** Empty query fields ("?kind=") mean no filter, as a plain GET form sends them. */
export function activityFilterInput(params: Record<string, string | string[] | undefined>): Record<string, string> {
  const out: Record<string, string> = {};
  for (const [k, v] of Object.entries(params)) {
    const one = Array.isArray(v) ? v[0] : v;
    if (one !== undefined && one !== "") out[k] = one;
  }
  return out;
}

/** UTC day bounds: [from 00:00, the day after `to` 00:00). */
export function activityRange(f: ActivityFilter): { from?: Date; to?: Date } {
  return {
    from: f.from ? new Date(`${f.from}T00:00:00Z`) : undefined,
    to: f.to ? new Date(Date.parse(`${f.to}T00:00:00Z`) + 86_400_000) : undefined,
  };
}

export type ActivityRow = {
  id: number;
  created_at: Date | string;
  entity: string;
  entity_id: string | null;
  kind: string;
  from_state: string | null;
  to_state: string | null;
  reason: string | null;
  data: unknown;
  actor_name: string | null;
  actor_email: string | null;
};

/** Where a change came from, when the event recorded it (sign-ins, exports and API token use do). */
export function activityAddress(data: unknown): string | null {
  const ip = data && typeof data === "object" ? (data as Record<string, unknown>).ip : null;
  return typeof ip === "string" ? ip : null;
}

export const ACTIVITY_CSV_FIELDS = ["at_utc", "who", "who_email", "record_type", "record_id", "change", "from_state", "to_state", "reason", "from_address", "details"] as const;

/** One CSV line per event; lib/csv/safe-cell.ts neutralises every text cell when the file is written. */
export function activityCsvRow(r: ActivityRow): Record<(typeof ACTIVITY_CSV_FIELDS)[number], CsvValue> {
  return {
    at_utc: new Date(r.created_at).toISOString(),
    who: r.actor_name ?? "the system",
    who_email: r.actor_email,
    record_type: r.entity,
    record_id: r.entity_id,
    change: r.kind,
    from_state: r.from_state,
    to_state: r.to_state,
    reason: r.reason,
    from_address: activityAddress(r.data),
    details: r.data === null || r.data === undefined ? null : JSON.stringify(r.data),
  };
}

// Retention --------------------------------------------------------------------------------------
// Admins choose how long the log keeps its events: 30 days to 10 years, or for ever (null).

export const RETENTION_MIN_DAYS = 30;
export const RETENTION_MAX_DAYS = 3650;
export const RETENTION_CHOICES = [30, 90, 180, 365, 730, 1825, 3650] as const;

const retentionDays = z
  .number({ error: "a whole number of days, or null to keep events for ever" })
  .int("a whole number of days")
  .min(RETENTION_MIN_DAYS, `at least ${RETENTION_MIN_DAYS} days`)
  .max(RETENTION_MAX_DAYS, `at most ${RETENTION_MAX_DAYS} days (10 years)`);

/** PUT /api/activity/retention: `retention_days` in days, or null for "keep for ever". */
export const activityRetentionSchema = z.object({ retention_days: z.union([retentionDays, z.null()], { error: "a whole number of days from 30 to 3650, or null to keep events for ever" }) }).strict();
export type ActivityRetentionInput = z.infer<typeof activityRetentionSchema>;

/**
 * Events that other records still read, so the retention never prunes them:
 * - unit, build, wash_batch, furnace_run: a unit's trace (db/trace/reads.ts), the finishing times
 *   quotes learn from (db/quotes/reads.ts) and the capacity page's throughput (db/capacity/reads.ts);
 * - material: the calibration history (db/calibration/reads.ts);
 * - feedstock_lot: which lot went where, for a recall;
 * - user: the security log (/setup/security, an audit trail with its own readers) and the
 *   password-reset throttle (db/auth/reads.ts).
 * Webhook deliveries do not read events (webhook_events is a table of its own, no foreign key).
 */
export const RETAINED_ENTITIES = ["unit", "build", "wash_batch", "furnace_run", "material", "feedstock_lot", "user"] as const;

export function retentionLabel(days: number | null): string {
  if (days === null) return "kept for ever";
  if (days % 365 === 0) return `kept for ${days / 365} year${days === 365 ? "" : "s"}`;
  return `kept for ${days} days`;
}
