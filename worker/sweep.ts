import type PgBoss from "pg-boss";
import { sql } from "kysely";
import type { Database } from "@/db/client";
import { advanceBooking } from "@/db/advance/commands";
import { listDueBookings } from "@/db/advance/reads";
import { checkStockAlerts } from "@/db/inventory/commands";
import { recomputeScaleUp } from "./handlers/scale-up";
import { drainOutbox } from "./handlers/send-mail";
import { shuffled } from "./limit";
import { expireQuotes } from "@/db/quotes/commands";

export type SweepResult = { advanced: number; rescaled: number; mail_sent: number; errors: string[]; ms: number };

/**
 * The safety net behind the jobs: advances bookings whose end passed without their job (a
 * worker died holding it, or nobody sent one), recomputes scale-ups older than their part or
 * material, mails feedstock reorder and bath change-out alerts once, and sends mail that is due. Several workers may sweep at once: bookings are locked
 * with SKIP LOCKED and every rule checks state first, so each change still happens once.
 */
export async function runSweep(db: Database, boss: PgBoss, workerId: string, opts: { limit: number }): Promise<SweepResult> {
  const started = performance.now();
  const record = await db.insertInto("worker_sweeps").values({ worker_id: workerId }).returning("id").executeTakeFirstOrThrow();
  const errors: string[] = [];
  let advanced = 0;
  let rescaled = 0;
  let mailSent = 0;
  try {
    for (const due of shuffled(await listDueBookings(db, opts.limit))) {
      try {
        const r = await advanceBooking(db, boss, due.entity, due.id, { via: "sweep", worker_id: workerId });
        if (r.status === "advanced") advanced++;
      } catch (err) {
        errors.push(`${due.entity} ${due.id}: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    try {
      rescaled = (await recomputeScaleUp(db, { stale: 200 })).changed;
    } catch (err) {
      errors.push(`scale-up: ${err instanceof Error ? err.message : String(err)}`);
    }
    try {
      await checkStockAlerts(db, boss);
    } catch (err) {
      errors.push(`stock alerts: ${err instanceof Error ? err.message : String(err)}`);
    }
    try {
      await expireQuotes(db);
    } catch (err) {
      errors.push(`quotes: ${err instanceof Error ? err.message : String(err)}`);
    }
    mailSent = (await drainOutbox(db, 200)).sent;
  } catch (err) {
    errors.push(err instanceof Error ? err.message : String(err));
  }
  await db
    .updateTable("worker_sweeps")
    .set({ finished_at: sql`now()`, advanced, rescaled, mail_sent: mailSent, error: errors.length ? errors.slice(0, 5).join("; ").slice(0, 2000) : null })
    .where("id", "=", record.id)
    .execute();
  // Keep a week of sweeps: enough to see a pattern, small enough to never matter.
  if (Math.random() < 0.02) await db.deleteFrom("worker_sweeps").where("started_at", "<", sql<Date>`now() - interval '7 days'`).execute();
  return { advanced, rescaled, mail_sent: mailSent, errors, ms: Math.round(performance.now() - started) };
}
