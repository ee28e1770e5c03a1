import { getDb } from "@/db/client";
import { changeStamp } from "@/db/live/stamps";
import { unscheduledBody } from "@/db/floor/unscheduled";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { sharedReadResponse } from "@/app/_server/cached-body";

// GET /api/floor/unscheduled – draft builds with every printer's verdict and print time (every role)
// One load per change stamp serves every open floor (db/floor/unscheduled.ts); the web server
// answers the plain signed-in case itself from the same cache (app/_server/shared-read-direct.ts).
export async function GET(req: Request) {
  try {
    const db = getDb();
    const [, stamp] = await Promise.all([requireUser("shop:read"), changeStamp(db, "shop")]);
    return sharedReadResponse(req, await unscheduledBody(db, stamp));
  } catch (err) {
    return toErrorResponse(err);
  }
}
