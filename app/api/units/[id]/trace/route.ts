import { getDb } from "@/db/client";
import { changeStamp } from "@/db/live/stamps";
import { unitTraceBody } from "@/db/trace/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { sharedReadResponse } from "@/app/_server/cached-body";

// GET /api/units/[id]/trace – material lot, build, printer, wash batch and masses, furnace run and profile, inspections and every event as one timeline (every role)
// One load per unit and change stamp serves every open page of that unit (db/trace/reads.ts);
// the web server answers the plain signed-in case itself (app/_server/shared-read-direct.ts).
export async function GET(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const db = getDb();
    const [, stamp] = await Promise.all([requireUser("shop:read"), changeStamp(db, "shop")]);
    const { id } = await params;
    return sharedReadResponse(req, await unitTraceBody(db, id, stamp));
  } catch (err) {
    return toErrorResponse(err);
  }
}
