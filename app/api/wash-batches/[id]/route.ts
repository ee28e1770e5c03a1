import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadShopContext, pathId } from "@/db/batches/reads";
import { getWashBatchDetail } from "@/db/wash-batches/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/wash-batches/[id] – a wash batch with its units, weighings and mass-loss checks (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const id = pathId((await params).id, "wash batch");
    const db = getDb();
    return NextResponse.json(await getWashBatchDetail(db, await loadShopContext(db), id));
  } catch (err) {
    return toErrorResponse(err);
  }
}
