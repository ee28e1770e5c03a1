import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { refuseProposal } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { refuseProposalSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/batches/suggest/refuse – set a proposal aside without booking it (technician, furnace operator, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("wash:write");
    const input = refuseProposalSchema.parse(await readJson(req));
    await refuseProposal(getDb(), input.proposal_id, input.reason, user.id);
    return NextResponse.json({ ok: true });
  } catch (err) {
    return toErrorResponse(err);
  }
}
