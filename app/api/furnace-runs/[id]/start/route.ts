import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId, withBatchTransaction } from "@/db/queries/batches";
import { startRun } from "@/db/queries/furnace-runs";
import { requireUser } from "@/lib/auth/session";
import { startRunSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/lib/http/errors";

// POST /api/furnace-runs/[id]/start – loading checklist ticked, the run starts now (inside staffed hours); units become sintering (furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("furnace:operate");
    const id = pathId((await params).id, "furnace run");
    const input = startRunSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) => startRun(trx, ctx, { runId: id, ...input }, user.id));
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
