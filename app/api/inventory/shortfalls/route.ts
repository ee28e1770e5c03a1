import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listShortBuilds } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/inventory/shortfalls – scheduled builds whose feedstock will not be on the shelf when they start (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ builds: await listShortBuilds(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
