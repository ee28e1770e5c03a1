import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { withBatchTransaction } from "@/db/batches/commands";
import { applyProposal } from "@/db/furnace-runs/commands";
import { actorCan } from "@/lib/auth/api-scopes";
import { requireUser } from "@/app/_server/session";
import { applyProposalSchema } from "@/lib/batches/schemas";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/batches/suggest/apply – book an accepted proposal as it was shown; 409 when stale (technician, furnace operator, admin; furnace runs need furnace:write)
export async function POST(req: Request) {
  try {
    const user = await requireUser("wash:write");
    const { proposal_id } = applyProposalSchema.parse(await readJson(req));
    const db = getDb();
    const p = await db.selectFrom("batch_proposals").select(["furnace", "wash"]).where("id", "=", proposal_id).executeTakeFirst();
    if (!p) throw new AppError("not_found", "That proposal does not exist.");
    if ((p.furnace as unknown[]).length && !actorCan(user, "furnace:write")) {
      throw new AppError("forbidden", "Booking furnace runs needs a furnace operator or an admin; accept only the wash batches, or ask one of them.");
    }
    const created = await withBatchTransaction(db, (trx, ctx) => applyProposal(trx, ctx, proposal_id, user.id));
    return NextResponse.json(created);
  } catch (err) {
    return toErrorResponse(err);
  }
}
