import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { addUnitToRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { addUnitSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/furnace-runs/[id]/units – put a brown unit on the run's trays; 422 with the rule it breaks (profile, height, load, room), 409 when stale (furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("furnace:write");
    const id = pathId((await params).id, "furnace run");
    const input = addUnitSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) =>
      addUnitToRun(trx, ctx, { runId: id, version: input.version, unitId: input.unit_id, unitVersion: input.unit_version }, user.id),
    );
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
