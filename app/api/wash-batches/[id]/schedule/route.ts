import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { scheduleWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { scheduleWashBatchSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// PATCH /api/wash-batches/[id]/schedule – book or move a wash batch on a station lane; 409 on a stale version or overlap (technician, furnace operator, admin)
export async function PATCH(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:write");
    const id = pathId((await params).id, "wash batch");
    const input = scheduleWashBatchSchema.parse(await readJson(req));
    const batch = await withBatchTransaction(getDb(), (trx, ctx) => scheduleWash(trx, ctx, { batchId: id, ...input }, user.id));
    return NextResponse.json(batch);
  } catch (err) {
    return toErrorResponse(err);
  }
}
