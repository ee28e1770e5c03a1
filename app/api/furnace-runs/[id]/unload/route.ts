import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { unloadRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { unloadRunSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/furnace-runs/[id]/unload – record each unit as sintered or scrapped with a reason (furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("furnace:operate");
    const id = pathId((await params).id, "furnace run");
    const input = unloadRunSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) => unloadRun(trx, ctx, { runId: id, ...input }, user.id));
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
