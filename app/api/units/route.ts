import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listUnits } from "@/db/units/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { listUnitsSchema } from "@/lib/parts/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/units – units with part, order, bookings and projected completion; sort, filter, search, pages (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const q = listUnitsSchema.parse(searchParams(req));
    return NextResponse.json(await listUnits(getDb(), q));
  } catch (err) {
    return toErrorResponse(err);
  }
}
