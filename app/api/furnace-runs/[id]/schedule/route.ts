import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { scheduleRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { scheduleFurnaceRunSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// PATCH /api/furnace-runs/[id]/schedule – book or move a run on a furnace lane; its length is the profile's cycle, a resize is refused (furnace operator, admin)
export async function PATCH(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("furnace:write");
    const id = pathId((await params).id, "furnace run");
    const input = scheduleFurnaceRunSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) => scheduleRun(trx, ctx, { runId: id, ...input }, user.id));
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
