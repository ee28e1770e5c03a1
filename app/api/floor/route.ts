import { cookies } from "next/headers";
import { getDb } from "@/db/client";
import { floorChangeStamp, floorWindowBody } from "@/db/floor/reads";
import { SESSION_COOKIE, forbidden, renewIfDue, requireUser, sessionOptions } from "@/app/_server/session";
import { currentBearer } from "@/app/_server/api-token-auth";
import { toErrorResponse } from "@/app/_server/errors";
import { sharedReadResponse } from "@/app/_server/cached-body";
import { FLOOR_PERMISSION, authorizeFloorRead } from "@/app/_server/floor-access";
import { AppError } from "@/lib/errors";
import { floorWindowSchema } from "@/lib/floor/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/floor?from&to – lanes (printers, wash stations, furnaces), bookings and maintenance in the visible window (every role)
// The web server answers the plain signed-in case itself (app/_server/shared-read-direct.ts) from the
// same cache and with the same rule (app/_server/floor-access.ts); this handler answers everything,
// including the refusals and the renewal of a session's idle lifetime.
export async function GET(req: Request) {
  try {
    const db = getDb();
    let stamp: string;
    if ((await currentBearer()) !== null) {
      // Another program with an API token: the same checks as every route (app/_server/session.ts).
      await requireUser(FLOOR_PERMISSION);
      stamp = await floorChangeStamp(db);
    } else {
      const seal = (await cookies()).get(SESSION_COOKIE)?.value;
      const access = await authorizeFloorRead(db, seal, sessionOptions(false).password as string);
      if (access.kind === "signed-out") throw new AppError("unauthenticated", "Sign in to continue.");
      if (access.kind === "forbidden") throw forbidden(access.role, FLOOR_PERMISSION);
      if (access.renewalDue) await renewIfDue();
      stamp = access.stamp;
    }
    const w = floorWindowSchema.parse(searchParams(req));
    // Everyone on the floor asks for the same few windows: one load serves them until anything on
    // the floor changes (the stamp moves, or the live listener hears of it) or two seconds pass.
    return sharedReadResponse(req, await floorWindowBody(db, w, stamp));
  } catch (err) {
    return toErrorResponse(err);
  }
}
