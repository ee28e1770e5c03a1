import { sql } from "kysely";
import type { Database } from "@/db/client";
import { listOpenOrdersForRisk, loadShopClock } from "@/db/capacity/reads";
import { overdueOrders } from "@/lib/capacity/projection-input";

/**
 * Notices orders that have become late (lib/capacity/projection-input.ts: overdueOrders, the
 * capacity page's rule) and records, for each, one "late" event in the activity log and one
 * "order.late" webhook event, in one transaction.
 *
 * Once per order per lateness: order_late_notices is keyed by the order and the due date it
 * missed, read from the order row at insert time. Another pass, or another worker at the same
 * moment, hits that key and records nothing (the second insert waits for the first to commit,
 * then does nothing). When the due date is moved later and the order is late again, the new
 * due date is a new key, so it fires again; a due date moved while the order is still late
 * (to an earlier time, or later but already passed) is a new key too and fires once more.
 */
export async function recordLateOrders(db: Database, now = new Date()): Promise<{ checked: number; noticed: string[] }> {
  const [clock, open] = await Promise.all([loadShopClock(db), listOpenOrdersForRisk(db, { dueBefore: now })]);
  const late = overdueOrders(open, clock, now);
  const noticed: string[] = [];
  for (const o of late) {
    const fired = await db.transaction().execute(async (trx) => {
      const row = await trx
        .insertInto("order_late_notices")
        .columns(["order_id", "due_at"])
        .expression((eb) => eb.selectFrom("orders").select(["id", "due_at"]).where("id", "=", o.id).where("due_at", "<=", now))
        .onConflict((oc) => oc.doNothing())
        .returning(["order_id", "due_at"])
        .executeTakeFirst();
      if (!row) return false;
      const data = {
        code: o.code,
        customer: o.customer,
        due_at: new Date(row.due_at).toISOString(),
        priority: o.priority,
        units_total: o.units_total,
        units_done: o.units_done,
        units_scrapped: o.units_scrapped,
        projected_end: o.projected_end,
      };
      const unfinished = o.units_total - o.units_done - o.units_scrapped;
      await trx
        .insertInto("events")
        .values({
          entity: "order",
          entity_id: o.id,
          kind: "late",
          actor_id: null,
          reason: `Due ${data.due_at} passed with ${unfinished} of ${o.units_total} unit${o.units_total === 1 ? "" : "s"} unfinished`,
          data: JSON.stringify(data),
        })
        .execute();
      await sql`select queue_webhook_event('order.late', 'order', ${o.id}::uuid, ${JSON.stringify({ ...data, at: now.toISOString() })}::jsonb)`.execute(trx);
      return true;
    });
    if (fired) noticed.push(o.id);
  }
  return { checked: late.length, noticed };
}
