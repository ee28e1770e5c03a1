import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { cancelRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { cancelSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/furnace-runs/[id]/cancel – cancel a draft or scheduled run; its units wait again (furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("furnace:write");
    const id = pathId((await params).id, "furnace run");
    const input = cancelSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) => cancelRun(trx, ctx, { runId: id, ...input }, user.id));
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
