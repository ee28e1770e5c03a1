import { sql } from "kysely";
import type { Database } from "@/db/client";
import { activityRange, type ActivityFilter, type ActivityRow } from "@/lib/activity/schemas";

/** The events a filter names; never a person's own security events (entity "user": the security log's). */
function filtered(db: Database, f: ActivityFilter) {
  const { from, to } = activityRange(f);
  let q = db.selectFrom("events").leftJoin("users as actor", "actor.id", "events.actor_id").where("events.entity", "<>", "user");
  if (f.entity) q = q.where("events.entity", "=", f.entity);
  if (f.kind) q = q.where("events.kind", "=", f.kind);
  if (f.record) q = q.where("events.entity_id", "=", f.record);
  if (f.user) {
    const like = `%${f.user.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    q = q.where((eb) => eb.or([eb("actor.name", "ilike", like), eb("actor.email", "ilike", like)]));
  }
  if (from) q = q.where("events.created_at", ">=", from);
  if (to) q = q.where("events.created_at", "<", to);
  return q;
}

/** Events newest first. */
export async function listActivity(db: Database, f: ActivityFilter, limit: number): Promise<ActivityRow[]> {
  const rows = await filtered(db, f)
    .select([
      "events.id",
      "events.created_at",
      "events.entity",
      "events.entity_id",
      "events.kind",
      "events.from_state",
      "events.to_state",
      "events.reason",
      "events.data",
      "actor.name as actor_name",
      "actor.email as actor_email",
    ])
    .orderBy("events.created_at", "desc")
    .orderBy("events.id", "desc")
    .limit(limit)
    .execute();
  return rows.map((r) => ({ ...r, id: Number(r.id) }));
}

/** How many events match, for "the newest 200 of …". */
export async function countActivity(db: Database, f: ActivityFilter): Promise<number> {
  const row = await filtered(db, f).select(sql<string>`count(*)`.as("n")).executeTakeFirstOrThrow();
  return Number(row.n);
}

/** Days the activity log keeps its events, or null: for ever. */
export async function getActivityRetention(db: Database): Promise<number | null> {
  const row = await db.selectFrom("shop_settings").select("activity_retention_days").where("id", "=", 1).executeTakeFirst();
  return row?.activity_retention_days ?? null;
}
