import { getDb } from "@/db/client";
import { getFileOrThrow } from "@/db/files/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { storedFileResponse } from "@/app/_server/stored-file";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/files/[id]/content – the stored bytes (the 3-D preview reads the STL through this) (every role).
// Streamed from the object store, never held whole in memory; a reader that leaves mid-body ends the store's stream.
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const f = await getFileOrThrow(getDb(), await readId(ctx, "File"));
    return await storedFileResponse(req, f, { what: "file", cache: "private, max-age=3600, immutable" });
  } catch (err) {
    return toErrorResponse(err);
  }
}
