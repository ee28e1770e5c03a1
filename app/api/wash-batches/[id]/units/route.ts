import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { addUnitToWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { addUnitSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/wash-batches/[id]/units – put a green unit into a wash batch; 422 with the rule it breaks, 409 when stale (technician, furnace operator, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("wash:write");
    const id = pathId((await params).id, "wash batch");
    const input = addUnitSchema.parse(await readJson(req));
    const batch = await withBatchTransaction(getDb(), (trx, ctx) =>
      addUnitToWash(trx, ctx, { batchId: id, version: input.version, unitId: input.unit_id, unitVersion: input.unit_version }, user.id),
    );
    return NextResponse.json(batch);
  } catch (err) {
    return toErrorResponse(err);
  }
}
