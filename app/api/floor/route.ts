import { getDb } from "@/db/client";
import { floorChangeStamp, floorWindowBody } from "@/db/floor/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { floorWindowSchema } from "@/lib/floor/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/floor?from&to – lanes (printers, wash stations, furnaces), bookings and maintenance in the visible window (every role)
// The web server answers the plain signed-in case itself (app/_server/floor-window-direct.ts) from the
// same cache; this handler is the whole rule, and answers everything else.
export async function GET(req: Request) {
  try {
    const db = getDb();
    // Everyone on the floor polls the same few windows: one load serves them until anything
    // on the floor changes (the stamp moves) or two seconds pass. The stamp is read alongside
    // the sign-in check; it tells nothing to someone who is then refused.
    const [, stamp] = await Promise.all([requireUser("shop:read"), floorChangeStamp(db)]);
    const w = floorWindowSchema.parse(searchParams(req));
    // Plain bytes: Next.js compresses a handler's response itself (and would do it twice).
    const { bytes, headers } = (await floorWindowBody(db, w, stamp)).encoded(false);
    return new Response(once(bytes), { headers });
  } catch (err) {
    return toErrorResponse(err);
  }
}

/** A body over the cached bytes themselves: a Uint8Array body would be copied per response. */
function once(bytes: Uint8Array): ReadableStream<Uint8Array> {
  return new ReadableStream({
    start(controller) {
      controller.enqueue(bytes);
      controller.close();
    },
  });
}
