import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { cancelWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { cancelSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/wash-batches/[id]/cancel – cancel a draft or scheduled wash batch; its units wait again (technician, furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:write");
    const id = pathId((await params).id, "wash batch");
    const input = cancelSchema.parse(await readJson(req));
    const batch = await withBatchTransaction(getDb(), (trx, ctx) => cancelWash(trx, ctx, { batchId: id, ...input }, user.id));
    return NextResponse.json(batch);
  } catch (err) {
    return toErrorResponse(err);
  }
}
