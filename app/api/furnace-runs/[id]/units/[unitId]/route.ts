import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { removeUnitFromRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { removeUnitSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// DELETE /api/furnace-runs/[id]/units/[unitId] – take a unit off a draft or scheduled run; body or ?version= (furnace operator, admin)
export async function DELETE(req: Request, { params }: { params: Promise<{ id: string; unitId: string }> }) {
  try {
    const user = await requireUser("furnace:write");
    const p = await params;
    const id = pathId(p.id, "furnace run");
    const unitId = pathId(p.unitId, "unit");
    const url = new URL(req.url);
    const body = (await readJson(req)) as Record<string, unknown>;
    const input = removeUnitSchema.parse({ version: url.searchParams.get("version") ?? undefined, unit_version: url.searchParams.get("unit_version") ?? undefined, ...body });
    const run = await withBatchTransaction(getDb(), (trx, ctx) => removeUnitFromRun(trx, ctx, { runId: id, version: input.version, unitId, unitVersion: input.unit_version }, user.id));
    return NextResponse.json(run);
  } catch (err) {
    return toErrorResponse(err);
  }
}
