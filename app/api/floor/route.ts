import { getDb } from "@/db/client";
import { floorChangeStamp, loadFloorJson } from "@/db/queries/floor";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";
import { floorWindowSchema } from "@/lib/floor/schemas";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/floor?from&to – lanes (printers, wash stations, furnaces), bookings and maintenance in the visible window (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const w = floorWindowSchema.parse(searchParams(req));
    const db = getDb();
    // Everyone on the floor polls the same few windows: one load serves them until anything
    // on the floor changes (the stamp moves) or two seconds pass.
    const stamp = await floorChangeStamp(db);
    const json = await floorWindowCache().get(`${w.from}|${w.to}`, stamp, () => loadFloorJson(db, w));
    // PostgreSQL wrote the JSON; parsing and re-serialising it here would only cost time.
    return new Response(json, { headers: { "content-type": "application/json", "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
