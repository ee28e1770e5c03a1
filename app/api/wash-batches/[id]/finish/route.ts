import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { finishWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { finishWashSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/wash-batches/[id]/finish – the basket is out: every unit weighed, units short of the mass-loss minimum are held with the reason (technician, furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:record");
    const id = pathId((await params).id, "wash batch");
    const input = finishWashSchema.parse(await readJson(req));
    const result = await withBatchTransaction(getDb(), (trx, ctx) => finishWash(trx, ctx, { batchId: id, ...input }, user.id));
    return NextResponse.json(result);
  } catch (err) {
    return toErrorResponse(err);
  }
}
