import { sql } from "kysely";
import type { Database } from "@/db/client";
import { type AdvanceJob } from "@/lib/jobs/queues";

// State advancement at a booking's end. Every path locks the booking row first and its units
// second (one order everywhere, so two workers queue up instead of deadlocking), then checks
// that the booking is still the one the job was sent for and still open. A unit changes only
// from the state the rule expects, so a repeated job or a second worker changes nothing twice;
// messages go to the outbox in the same transaction under its unique key.
//
// Rules (who = null for the worker on every event):
//  - build end: units planned|printing → green, the build → complete. A build marked failed
//    scraps its units instead (scrap_reason print_failure, the build's failure reason as the
//    note): the parts were not made, and a person reorders them. Mail: build_finished|failed.
//  - wash end: the batch → complete. After shop_settings.drying_minutes more, units
//    washing (or green and unchanged since the batch dried) → brown when the mass-loss check
//    passes, otherwise on_hold with the reason (held_from green: it goes back for another
//    wash). Mail: wash_done.
//  - furnace run end (the cycle includes cool-down): units brown|sintering → sintered → ready
//    for finishing, the run → complete. Units an operator unloaded as sintered by hand are
//    moved on by the sweep. Mail: furnace_run_finished, ready_for_finishing.
//  - a booking completed by hand whose job then arrives (same version) changes nothing more
//    but still sends its mail.

export type BookingEntity = AdvanceJob["entity"];

/**
 * Bookings the sweep should look at: open ones whose end has passed, wash batches whose drying
 * has passed with units still waiting, finished runs with units still sintered. Their own jobs
 * normally get there first; this catches jobs lost with a crashed worker or never sent.
 */
export async function listDueBookings(db: Database, limit: number): Promise<{ entity: BookingEntity; id: string }[]> {
  const result = await sql<{ entity: BookingEntity; id: string }>`
    with settings as (select make_interval(mins => coalesce(max(drying_minutes), 0)) as drying from shop_settings)
    (select 'build' as entity, id, ends_at as due from builds
      where state in ('scheduled', 'running') and ends_at <= now())
    union all
    (select 'wash_batch', id, ends_at from wash_batches
      where state in ('scheduled', 'running') and ends_at <= now())
    union all
    (select 'wash_batch', b.id, b.ends_at + s.drying from wash_batches b, settings s
      where b.state = 'complete' and b.ends_at + s.drying <= now() and b.ends_at > now() - interval '30 days'
        and exists (select 1 from units u where u.wash_batch_id = b.id
          and (u.state = 'washing' or (u.state = 'green' and u.state_changed_at <= b.ends_at + s.drying))))
    union all
    (select 'furnace_run', id, ends_at from furnace_runs
      where state in ('scheduled', 'running') and ends_at <= now())
    union all
    (select 'furnace_run', r.id, r.ends_at from furnace_runs r
      where r.state = 'complete' and r.ends_at > now() - interval '30 days'
        and exists (select 1 from units u where u.furnace_run_id = r.id and u.state = 'sintered'))
    order by due
    limit ${limit}`.execute(db);
  return result.rows.map((r) => ({ entity: r.entity, id: r.id }));
}
