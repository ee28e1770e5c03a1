import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { startWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { versionSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/wash-batches/[id]/start – the basket goes in now (inside staffed hours); units become washing (technician, furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:write");
    const id = pathId((await params).id, "wash batch");
    const input = versionSchema.parse(await readJson(req));
    const batch = await withBatchTransaction(getDb(), (trx, ctx) => startWash(trx, ctx, { batchId: id, version: input.version }, user.id));
    return NextResponse.json(batch);
  } catch (err) {
    return toErrorResponse(err);
  }
}
