import { getDb } from "@/db/client";
import { getFileOrThrow } from "@/db/files/reads";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";
import { openObject, type OpenedObject } from "@/adapters/storage/s3";
import { DECLARED_LENGTH_HEADER } from "@/lib/http/declared-length";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/files/[id]/content – the stored bytes (the 3-D preview reads the STL through this) (every role).
// Streamed from the object store, never held whole in memory; a reader that leaves mid-body ends the store's stream.
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const f = await getFileOrThrow(getDb(), await readId(ctx, "File"));
    let obj: OpenedObject;
    try {
      obj = await openObject(f.bucket, f.object_key, req.signal);
    } catch {
      throw new AppError("unavailable", "File storage did not return the file; try again in a moment.");
    }
    const headers: Record<string, string> = {
      "content-type": f.content_type,
      "content-disposition": `inline; filename="${f.filename.replace(/[^\w.-]/g, "_")}"`,
      "cache-control": "private, max-age=3600, immutable",
    };
    if (obj.length !== undefined) headers[DECLARED_LENGTH_HEADER] = String(obj.length);
    return new Response(obj.body, { headers });
  } catch (err) {
    return toErrorResponse(err);
  }
}
