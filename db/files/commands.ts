import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { FileStatus, Json } from "@/db/schema";

export async function insertFile(
  db: Database,
  f: { kind: "geometry" | "attachment"; bucket: string; object_key: string; filename: string; content_type: string; size_bytes: number; sha256: string; uploaded_by: string | null },
) {
  return db.insertInto("files").values({ ...f, status: "queued" }).returningAll().executeTakeFirstOrThrow();
}

/**
 * Moves a file's analysis on, only from the state it is expected to be in, so a repeated job
 * or a slower twin cannot overwrite a finished result. Returns the row when it moved.
 */
export async function setFileStatus(db: Database, id: string, from: FileStatus[], to: FileStatus, patch: { analysis?: Json; error?: string | null } = {}) {
  return db
    .updateTable("files")
    .set({
      status: to,
      ...(patch.analysis !== undefined ? { analysis: JSON.stringify(patch.analysis) } : {}),
      ...(patch.error !== undefined ? { error: patch.error } : {}),
      updated_at: sql`now()`,
    })
    .where("id", "=", id)
    .where("status", "in", from)
    .returningAll()
    .executeTakeFirst();
}
