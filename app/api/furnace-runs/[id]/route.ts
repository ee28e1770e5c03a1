import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadShopContext, pathId } from "@/db/queries/batches";
import { getRunDetail } from "@/db/queries/furnace-runs";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";

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
