import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { recordWashMasses } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { recordMassesSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// PUT /api/wash-batches/[id]/masses – record green and brown weighings; answers with each unit's mass loss against its material's minimum (technician, furnace operator, admin)
export async function PUT(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:record");
    const id = pathId((await params).id, "wash batch");
    const input = recordMassesSchema.parse(await readJson(req));
    const result = await withBatchTransaction(getDb(), (trx, ctx) => recordWashMasses(trx, ctx, { batchId: id, ...input }, user.id));
    return NextResponse.json(result);
  } catch (err) {
    return toErrorResponse(err);
  }
}
