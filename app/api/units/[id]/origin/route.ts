import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { unitOrigin } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/units/[id]/origin – where a unit came from: its feedstock lots, printer, wash, furnace run and profile (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ origin: await unitOrigin(getDb(), await readId(ctx, "Unit")) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
