import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { applyPlanProposal, refusePlanProposal } from "@/db/builds/commands";
import { getPlanProposal } from "@/db/builds/reads";
import { requireUser } from "@/app/_server/session";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { decidePlanSchema } from "@/lib/floor/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/plans/[id] – one proposal as it was made (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ proposal: await getPlanProposal(getDb(), await readId(ctx, "Plan proposal")) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/plans/[id] – apply a proposal in one transaction (409 when stale) or refuse it (technician, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("plan:apply");
    const id = await readId(ctx, "Plan proposal");
    const { decision } = decidePlanSchema.parse(await readJson(req));
    const db = getDb();
    if (decision === "refuse") {
      const row = await refusePlanProposal(db, id, user.id, "refused by the planner");
      if (!row) throw new AppError("conflict", "This proposal was already decided.");
      return NextResponse.json({ proposal: row });
    }
    try {
      const row = await db.transaction().execute((trx) => applyPlanProposal(trx, id, user.id));
      floorWindowCache().clear();
      return NextResponse.json({ proposal: row });
    } catch (err) {
      // Nothing was booked; the proposal is closed so that nobody applies it later by mistake.
      if (err instanceof AppError && err.status === 409 && err.message.startsWith("The proposal is stale")) {
        await refusePlanProposal(db, id, user.id, err.message);
      }
      throw err;
    }
  } catch (err) {
    return toErrorResponse(err);
  }
}
