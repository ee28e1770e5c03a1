import { getDb } from "@/db/client";
import { loadFloorJson } from "@/db/queries/floor";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";
import { floorWindowSchema } from "@/lib/floor/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/floor?from&to – lanes (printers, wash stations, furnaces), bookings and maintenance in the visible window (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const w = floorWindowSchema.parse(searchParams(req));
    // PostgreSQL writes the JSON; parsing and re-serialising it here would only cost time.
    return new Response(await loadFloorJson(getDb(), w), { headers: { "content-type": "application/json", "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
