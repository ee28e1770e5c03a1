import { type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { recordEvents } from "@/db/versioned";

type Trx = Transaction<DB>;

/** New planned units for a part, numbered on from what it has (serial = order-part-NN). */
export async function insertUnitsForPart(trx: Trx | Database, part: { id: string; part_number: string; order_code: string }, count: number, actorId: string | null) {
  if (count <= 0) return [];
  const existing = await trx.selectFrom("units").select("serial").where("part_id", "=", part.id).execute();
  const taken = new Set(existing.map((e) => e.serial));
  const serials: string[] = [];
  for (let k = 1; serials.length < count; k++) {
    const s = `${part.order_code}-${part.part_number}-${String(k).padStart(2, "0")}`;
    if (!taken.has(s)) serials.push(s);
  }
  const rows = await trx
    .insertInto("units")
    .values(serials.map((serial) => ({ part_id: part.id, serial, state: "planned" as const })))
    .returning(["id", "serial"])
    .execute();
  await recordEvents(trx, rows.map((r) => ({ entity: "unit", entity_id: r.id, kind: "state", from_state: null, to_state: "planned", actor_id: actorId, reason: "created from order" })));
  return rows;
}
