import type { Database } from "@/db/client";
import type { DB } from "@/db/schema";
import { AppError } from "@/lib/errors";

type VersionedTable = { [K in keyof DB]: DB[K] extends { version: unknown; id: unknown } ? K : never }[keyof DB];

/**
 * After an update guarded by `version` touched no row: a missing row is a 404, a row that
 * moved on is a 409 that tells the user to reload (their input is kept by the page).
 */
export async function throwStaleOrMissing(db: Database, table: VersionedTable, id: string, what: string): Promise<never> {
  const row = await db
    .selectFrom(table as "printers")
    .select("version")
    .where("id", "=", id)
    .executeTakeFirst();
  if (!row) throw new AppError("not_found", `${what} not found.`);
  throw new AppError("conflict", `${what} was changed by someone else (now version ${row.version}); reload to see their change, then apply yours again.`, undefined, { current_version: row.version });
}
