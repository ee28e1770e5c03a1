import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { removeUnitFromWash } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { removeUnitSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// DELETE /api/wash-batches/[id]/units/[unitId] – take a unit out of a draft or scheduled wash batch; body or ?version= (technician, furnace operator, admin)
export async function DELETE(req: Request, { params }: { params: Promise<{ id: string; unitId: string }> }) {
  try {
    const user = await requireUser("wash:write");
    const p = await params;
    const id = pathId(p.id, "wash batch");
    const unitId = pathId(p.unitId, "unit");
    const url = new URL(req.url);
    const body = (await readJson(req)) as Record<string, unknown>;
    const input = removeUnitSchema.parse({ version: url.searchParams.get("version") ?? undefined, unit_version: url.searchParams.get("unit_version") ?? undefined, ...body });
    const batch = await withBatchTransaction(getDb(), (trx, ctx) => removeUnitFromWash(trx, ctx, { batchId: id, version: input.version, unitId, unitVersion: input.unit_version }, user.id));
    return NextResponse.json(batch);
  } catch (err) {
    return toErrorResponse(err);
  }
}
