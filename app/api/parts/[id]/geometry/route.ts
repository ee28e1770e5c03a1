import { randomUUID } from "node:crypto";
import { NextResponse } from "next/server";
import { sql } from "kysely";
import { getDb } from "@/db/client";
import { getPartOrThrow } from "@/db/parts/reads";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { toErrorResponse } from "@/app/_server/errors";
import { deleteObjectQuietly } from "@/adapters/storage/s3";
import { readId, type IdContext } from "@/app/api/builds/_helpers";
import { receiveStl, recordStl, storeStl, type ReceivedStl } from "@/app/_server/stl-upload";

// POST /api/parts/[id]/geometry – upload the part's STL (raw body, name in x-filename); checked before anything is stored, analysed by the worker (technician, admin)
export async function POST(req: Request, ctx: IdContext) {
  let stl: ReceivedStl | null = null;
  let storedKey: string | null = null;
  try {
    const user = await requireUser("geometry:upload");
    const id = await readId(ctx, "Part");
    const db = getDb();
    const part = await getPartOrThrow(db, id);
    stl = await receiveStl(req, new URL(req.url).searchParams.get("filename"));
    const received = stl;
    const fileId = randomUUID();
    const key = `geometry/${part.id}/${fileId}.stl`;
    storedKey = key;
    await storeStl(key, stl.upload);
    const { file, replaced } = await db.transaction().execute(async (trx) => {
      const current = await trx.selectFrom("parts").select("geometry_file_id").where("id", "=", part.id).forUpdate().executeTakeFirstOrThrow();
      const row = await recordStl(trx, fileId, key, received, user.id);
      await trx.updateTable("parts").set({ geometry_file_id: fileId, updated_at: sql`now()`, version: sql`version + 1` }).where("id", "=", part.id).execute();
      // The file this one replaces goes with it: only the part pointed at it.
      const replaced = current.geometry_file_id
        ? await trx.deleteFrom("files").where("id", "=", current.geometry_file_id).where("kind", "=", "geometry").returning(["bucket", "object_key"]).executeTakeFirst()
        : undefined;
      return { file: row, replaced };
    });
    storedKey = null;
    if (replaced) await deleteObjectQuietly(replaced.bucket, replaced.object_key);
    return NextResponse.json({ file: { ...file, triangles: stl.triangles } }, { status: 201 });
  } catch (err) {
    if (storedKey) await deleteObjectQuietly(getEnv().S3_BUCKET, storedKey);
    return toErrorResponse(err);
  } finally {
    await stl?.upload.dispose();
  }
}
