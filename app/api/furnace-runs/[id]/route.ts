import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadShopContext, pathId } from "@/db/batches/reads";
import { getRunDetail } from "@/db/furnace-runs/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/furnace-runs/[id] – a run with its profile curve, tray layout, checklist and unit outcomes (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const id = pathId((await params).id, "furnace run");
    const db = getDb();
    return NextResponse.json(await getRunDetail(db, await loadShopContext(db), id));
  } catch (err) {
    return toErrorResponse(err);
  }
}
