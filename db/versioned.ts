// Optimistic concurrency in one place: every state change locks its row, checks the version the
// person saw, changes it, and records an event, all in the caller's transaction.
import type { Kysely, Selectable, Transaction } from "kysely";
import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";

type VersionedTable = { [K in keyof DB]: DB[K] extends { version: unknown; id: unknown } ? K : never }[keyof DB];

/** The conflict every stale edit answers with: 409, the current version, and the person's input kept by the page. */
export function staleVersion(what: string, current: number, given: number, details: Record<string, unknown> = {}): AppError {
  return new AppError("conflict", `${what} was changed by someone else (you had version ${given}, it is now ${current}); reload to see the change, then apply yours again.`, undefined, {
    current_version: current,
    ...details,
  });
}

/** Throws the stale-version conflict when the version the person saw is not the row's. */
export function requireVersion(what: string, current: number, given: number | undefined, details?: Record<string, unknown>): void {
  if (given !== undefined && current !== given) throw staleVersion(what, current, given, details);
}

/** Locks one row of a versioned table (SELECT … FOR UPDATE) or answers 404 with `missing`. */
export async function lockRowOrThrow<T extends VersionedTable>(trx: Transaction<DB>, table: T, id: string, missing: string) {
  const row = await (trx as unknown as Transaction<Pick<DB, "builds">>)
    .selectFrom(table as "builds")
    .selectAll()
    .where("id", "=", id)
    .forUpdate()
    .executeTakeFirst();
  if (!row) throw new AppError("not_found", missing);
  return row as unknown as Selectable<DB[T]>;
}

/**
 * After an update guarded by `version` touched no row: a missing row is a 404, a row that
 * moved on is a 409 that tells the user to reload (their input is kept by the page).
 */
export async function throwStaleOrMissing(db: Database, table: VersionedTable, id: string, what: string, given?: number): Promise<never> {
  const row = await db
    .selectFrom(table as "printers")
    .select("version")
    .where("id", "=", id)
    .executeTakeFirst();
  if (!row) throw new AppError("not_found", `${what} not found.`);
  if (given !== undefined) throw staleVersion(what, row.version, given);
  throw new AppError("conflict", `${what} was changed by someone else (now version ${row.version}); reload to see their change, then apply yours again.`, undefined, { current_version: row.version });
}

export type EventRow = {
  entity: string;
  entity_id: string | null;
  kind: string;
  from_state?: string | null;
  to_state?: string | null;
  actor_id: string | null;
  reason?: string | null;
  data?: unknown;
};

/** Appends rows to the event log (who, when, from, to, why) in the caller's transaction. */
export async function recordEvents(db: Kysely<DB>, rows: EventRow[]): Promise<void> {
  if (!rows.length) return;
  await db
    .insertInto("events")
    .values(rows.map((r) => ({ ...r, from_state: r.from_state ?? null, to_state: r.to_state ?? null, reason: r.reason ?? null, data: r.data == null ? null : JSON.stringify(r.data) })))
    .execute();
}
