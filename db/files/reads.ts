import type { Database } from "@/db/client";
import { isUuid } from "@/lib/ids";
import { AppError } from "@/lib/errors";

export async function findFileById(db: Database, id: string) {
  if (!isUuid(id)) return undefined;
  return db.selectFrom("files").selectAll().where("id", "=", id).executeTakeFirst();
}

export async function getFileOrThrow(db: Database, id: string) {
  const f = await findFileById(db, id);
  if (!f) throw new AppError("not_found", "That file does not exist.");
  return f;
}

/** The part a geometry file belongs to (the part points at its current file). */
export async function findPartForFile(db: Database, fileId: string) {
  return db.selectFrom("parts").select(["id", "part_number", "version", "volume_mm3"]).where("geometry_file_id", "=", fileId).executeTakeFirst();
}

/** Which of these object keys a files row still names (the rest are orphans of a failed upload). */
export async function listKnownObjectKeys(db: Database, bucket: string, keys: string[]): Promise<Set<string>> {
  if (keys.length === 0) return new Set();
  const rows = await db.selectFrom("files").select("object_key").where("bucket", "=", bucket).where("object_key", "in", keys).execute();
  return new Set(rows.map((r) => r.object_key));
}
