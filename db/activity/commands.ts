import { sql } from "kysely";
import type { Database } from "@/db/client";
import { RETAINED_ENTITIES, type ActivityRetentionInput } from "@/lib/activity/schemas";
import { getActivityRetention } from "./reads";

/** Sets how many days the activity log keeps (null: for ever), and notes who changed it. */
export async function setActivityRetention(db: Database, actorId: string, input: ActivityRetentionInput) {
  return db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom("shop_settings").select("activity_retention_days").where("id", "=", 1).forUpdate().executeTakeFirst();
    await trx.updateTable("shop_settings").set({ activity_retention_days: input.retention_days, updated_at: sql`now()` }).where("id", "=", 1).execute();
    await trx
      .insertInto("events")
      .values({
        entity: "shop_settings",
        entity_id: null,
        kind: "activity_retention",
        actor_id: actorId,
        data: JSON.stringify({ from_days: before?.activity_retention_days ?? null, to_days: input.retention_days }),
      })
      .execute();
    return input.retention_days;
  });
}

/**
 * Deletes events older than the retention, `batch` rows per statement (each its own short
 * transaction, so the table is never locked for long and other writers go on), skipping rows
 * another worker is deleting. Events of RETAINED_ENTITIES stay: other records still read them.
 */
export async function pruneActivity(db: Database, opts: { batch?: number; maxBatches?: number } = {}): Promise<{ retention_days: number | null; deleted: number }> {
  const days = await getActivityRetention(db);
  if (days === null) return { retention_days: null, deleted: 0 };
  const batch = opts.batch ?? 5000;
  const cutoff = sql<Date>`now() - make_interval(days => ${days})`;
  let deleted = 0;
  for (let i = 0; i < (opts.maxBatches ?? 1000); i++) {
    const r = await db
      .deleteFrom("events")
      .where("id", "in", (eb) =>
        eb
          .selectFrom("events")
          .select("id")
          .where("created_at", "<", cutoff)
          .where("entity", "not in", [...RETAINED_ENTITIES])
          .orderBy("created_at")
          .limit(batch)
          .forUpdate()
          .skipLocked(),
      )
      .executeTakeFirst();
    const n = Number(r.numDeletedRows);
    deleted += n;
    if (n < batch) break;
  }
  return { retention_days: days, deleted };
}
