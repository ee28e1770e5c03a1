import { sql } from "kysely";
import type { Database } from "@/db/client";
import type { FileStatus, Json } from "@/db/schema";
import { AppError } from "@/lib/errors";

export async function insertFile(
  db: Database,
  f: { kind: "geometry" | "attachment"; bucket: string; object_key: string; filename: string; content_type: string; size_bytes: number; sha256: string; uploaded_by: string | null },
) {
  return db.insertInto("files").values({ ...f, status: "queued" }).returningAll().executeTakeFirstOrThrow();
}

export async function findFileById(db: Database, id: string) {
  if (!/^[0-9a-f-]{36}$/i.test(id)) return undefined;
  return db.selectFrom("files").selectAll().where("id", "=", id).executeTakeFirst();
}

export async function getFileOrThrow(db: Database, id: string) {
  const f = await findFileById(db, id);
  if (!f) throw new AppError("not_found", "That file does not exist.");
  return f;
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

/** The part a geometry file belongs to (the part points at its current file). */
export async function findPartForFile(db: Database, fileId: string) {
  return db.selectFrom("parts").select(["id", "part_number", "version", "volume_mm3"]).where("geometry_file_id", "=", fileId).executeTakeFirst();
}
