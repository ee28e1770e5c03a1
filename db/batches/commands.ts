import { sql, type Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import type {
BoardUnit
} from "@/lib/batches/types";
import type { Busy, SuggestResult } from "@/lib/batches/suggest";
import { runSearch } from "@/db/compute/run";
import { type Db, type ShopContext, loadShopContext, listBoardUnits } from "./reads";

// Proposals ------------------------------------------------------------------------------------

async function busyIntervals(db: Db, now: Date): Promise<Busy[]> {
  const [runs, washes, blocks] = await Promise.all([
    db.selectFrom("furnace_runs").select(["furnace_id as resource_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running"]).where("ends_at", ">", now).execute(),
    db.selectFrom("wash_batches").select(["wash_station_id as resource_id", "starts_at", "ends_at"]).where("state", "in", ["scheduled", "running"]).where("ends_at", ">", now).execute(),
    db
      .selectFrom("maintenance_windows")
      .select([sql<string>`coalesce(furnace_id, wash_station_id, printer_id)`.as("resource_id"), "starts_at", "ends_at"])
      .where("resource", "in", ["furnace", "wash_station"])
      .where("ends_at", ">", now)
      .execute(),
  ]);
  return [...runs, ...washes, ...blocks]
    .filter((b) => b.resource_id && b.starts_at && b.ends_at)
    .map((b) => ({ resource_id: b.resource_id!, start: new Date(b.starts_at!).getTime(), end: new Date(b.ends_at!).getTime() }));
}

export type Proposal = SuggestResult & {
  id: string;
  planned_from: string;
  /** What is open on the board now, for the diff. */
  current: { wash_batches: number; furnace_runs: number };
  server_ms: number;
  /** Where the time went: reading the shop and its units, planning, storing the proposal; whether the plan ran on a compute thread. */
  timing: { load_ms: number; plan_ms: number; store_ms: number; on_thread: boolean };
};

/**
 * Computes and stores a proposal for the units waiting now. The route and the benchmark both
 * call this, so the benchmark times exactly what a person waits for.
 */
export async function proposeBatches(
  db: Database,
  opts: { wash: boolean; furnace: boolean; horizon_hours: number; profile_ids?: string[]; budget_ms?: number },
  actorId: string | null,
  now = new Date(),
): Promise<Proposal> {
  const t0 = performance.now();
  const ctx = await loadShopContext(db, now);
  const horizon = new Date(now.getTime() + opts.horizon_hours * 3_600_000);
  const only = opts.profile_ids?.length ? new Set(opts.profile_ids) : null;
  const keep = (u: BoardUnit) => !only || (u.profile_id !== null && only.has(u.profile_id));
  const [washAll, furnaceAll, busy, open] = await Promise.all([
    opts.wash ? listBoardUnits(db, ctx, { kind: "waiting_wash" }) : Promise.resolve([]),
    opts.furnace ? listBoardUnits(db, ctx, { kind: "waiting_furnace", horizon }) : Promise.resolve([]),
    busyIntervals(db, now),
    Promise.all([
      db.selectFrom("wash_batches").select((eb) => eb.fn.countAll<number>().as("n")).where("state", "in", ["draft", "scheduled"]).executeTakeFirstOrThrow(),
      db.selectFrom("furnace_runs").select((eb) => eb.fn.countAll<number>().as("n")).where("state", "in", ["draft", "scheduled"]).executeTakeFirstOrThrow(),
    ]),
  ]);
  const tLoaded = performance.now();
  const washUnits = washAll.filter(keep);
  const furnaceUnits = furnaceAll.filter(keep);
  const { result, onThread } = await runSearch("suggest", {
    now,
    staffing: ctx.staffing,
    clearance_mm: ctx.clearance_mm,
    drying_minutes: ctx.drying_minutes,
    finishing_lead_minutes: ctx.finishing_lead_minutes,
    furnaces: ctx.furnaces,
    stations: ctx.stations,
    profiles: ctx.profiles,
    wash_units: washUnits,
    furnace_units: furnaceUnits,
    busy,
    wash: opts.wash,
    furnace: opts.furnace,
    search_budget_ms: opts.budget_ms,
  }, opts.budget_ms);
  const tPlanned = performance.now();
  const row = await db
    .insertInto("batch_proposals")
    .values({
      created_by: actorId,
      planned_from: now,
      wash: JSON.stringify(result.wash),
      furnace: JSON.stringify(result.furnace),
      unplaced: JSON.stringify(result.unplaced),
      metrics: JSON.stringify({ ...result.metrics, load_ms: Math.round(tLoaded - t0), plan_ms: Math.round(tPlanned - tLoaded), server_ms: Math.round(performance.now() - t0) }),
    })
    .returning("id")
    .executeTakeFirstOrThrow();
  return {
    ...result,
    id: row.id,
    planned_from: now.toISOString(),
    current: { wash_batches: Number(open[0].n), furnace_runs: Number(open[1].n) },
    server_ms: Math.round(performance.now() - t0),
    timing: { load_ms: Math.round(tLoaded - t0), plan_ms: Math.round(tPlanned - tLoaded), store_ms: Math.round(performance.now() - tPlanned), on_thread: onThread },
  };
}

/** One transaction with the shop's rules loaded inside it, for every booking change. */
export async function withBatchTransaction<T>(db: Database, fn: (trx: Transaction<DB>, ctx: ShopContext) => Promise<T>): Promise<T> {
  // The shop's settings, equipment and profiles are read just before the transaction, side by
  // side on the pool, not one after another on its one connection (ten round trips inside every
  // booking's transaction). Nothing among them is locked or version-checked, and each read saw
  // only what was committed before it ran (READ COMMITTED) wherever it ran; the rows a command
  // changes are still locked and their versions checked inside the transaction.
  const ctx = await loadShopContext(db);
  return db.transaction().execute((trx) => fn(trx, ctx));
}
