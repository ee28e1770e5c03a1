import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { gasOutlook, listBaths } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/inventory/consumables – each solvent bath's binder load and the process gas on hand against scheduled runs (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    const db = getDb();
    const [baths, gas] = await Promise.all([listBaths(db), gasOutlook(db)]);
    return NextResponse.json({ baths, gas });
  } catch (err) {
    return toErrorResponse(err);
  }
}
