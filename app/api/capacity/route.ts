import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadCapacity, loadShopClock } from "@/db/capacity/reads";
import { requireUser } from "@/app/_server/session";
import { capacityQuerySchema } from "@/lib/capacity/schemas";
import { defaultRange } from "@/lib/capacity/summary";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/capacity?from=YYYY-MM-DD&to=YYYY-MM-DD – utilization, queue, work in progress, late orders, throughput (manager, admin)
export async function GET(req: Request) {
  try {
    await requireUser("capacity:read");
    const url = new URL(req.url);
    const db = getDb();
    let from = url.searchParams.get("from");
    let to = url.searchParams.get("to");
    if (!from && !to) ({ from, to } = defaultRange(new Date(), (await loadShopClock(db)).time_zone));
    const query = capacityQuerySchema.parse({ from: from ?? undefined, to: to ?? undefined });
    return NextResponse.json(await loadCapacity(db, query), { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
