import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listFinishingQueue } from "@/db/finishing/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/finishing – units arriving from furnace runs, ready, in finishing, held, lately done (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json(await listFinishingQueue(getDb()), { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
