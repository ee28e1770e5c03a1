import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { MaterialInput } from "@/lib/setup/schemas";
import { getSender, inTrx } from "@/db/jobs/boss";
import { QUEUES } from "@/lib/jobs/queues";
import { throwStaleOrMissing } from "@/db/versioned";
import { recordEvents } from "@/db/versioned";

export async function insertMaterial(db: Database, input: MaterialInput) {
  return db.insertInto("materials").values(input).returningAll().executeTakeFirstOrThrow();
}

/**
 * A change of shrinkage is logged and queues a recomputation of the green sizes of the
 * material's parts, in the same transaction; builds keep the factors they were printed with.
 */
export async function updateMaterial(db: Database, id: string, version: number, input: Partial<MaterialInput>, actorId: string | null = null) {
  return db.transaction().execute(async (trx) => {
    const before = await trx.selectFrom("materials").select(["shrink_xy", "shrink_z"]).where("id", "=", id).executeTakeFirst();
    const row = await trx
      .updateTable("materials")
      .set({ ...input, version: sql`version + 1`, updated_at: sql`now()` })
      .where("id", "=", id)
      .where("version", "=", version)
      .returningAll()
      .executeTakeFirst();
    if (!row || !before) return throwStaleOrMissing(trx, "materials", id, "Material");
    if (before.shrink_xy !== row.shrink_xy || before.shrink_z !== row.shrink_z) {
      await recordEvents(trx, [{ entity: "material", entity_id: id, kind: "shrinkage_change", actor_id: actorId, data: { from: before, to: { shrink_xy: row.shrink_xy, shrink_z: row.shrink_z } } }]);
      const boss = await getSender();
      await boss.send(QUEUES.scaleUp, { material_id: id }, { db: inTrx(trx), retryLimit: 5, retryBackoff: true });
    }
    return row;
  });
}
