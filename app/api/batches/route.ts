import { getDb } from "@/db/client";
import { boardBody, boardChangeStamp } from "@/db/batches/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { sharedReadResponse } from "@/app/_server/cached-body";

// GET /api/batches – the batching board: waiting units, open wash batches and furnace runs, equipment (every role)
// Every open board asks again after each change it hears of: one load serves them all until
// anything on the board changes (the stamp moves, or the live listener hears of it) or two
// seconds pass. The stamp tells nothing to someone who is then refused. The web server answers
// the plain signed-in case itself from the same cache (app/_server/shared-read-direct.ts).
export async function GET(req: Request) {
  try {
    const db = getDb();
    const [, stamp] = await Promise.all([requireUser("shop:read"), boardChangeStamp(db)]);
    return sharedReadResponse(req, await boardBody(db, stamp));
  } catch (err) {
    return toErrorResponse(err);
  }
}
