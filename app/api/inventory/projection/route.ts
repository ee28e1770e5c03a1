import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { projectStock } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { projectionQuerySchema } from "@/lib/inventory/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/inventory/projection?days=28 – per material: on hand, committed to scheduled builds, projected day by day, first short day (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const { days } = projectionQuerySchema.parse(searchParams(req));
    return NextResponse.json(await projectStock(getDb(), { days }));
  } catch (err) {
    return toErrorResponse(err);
  }
}
