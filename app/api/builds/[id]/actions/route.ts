import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { applyBuildAction } from "@/db/builds/commands";
import { requireUser } from "@/app/_server/session";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { buildActionSchema } from "@/lib/builds/schemas";
import { readId, type IdContext } from "../../_helpers";

// POST /api/builds/[id]/actions – start, complete, fail (with the reason) or cancel a build, with its version (technician, admin)
export async function POST(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("builds:write");
    const id = await readId(ctx, "Build");
    const input = buildActionSchema.parse(await readJson(req));
    const build = await getDb().transaction().execute((trx) => applyBuildAction(trx, id, input, user.id));
    floorWindowCache().clear();
    return NextResponse.json({ build });
  } catch (err) {
    return toErrorResponse(err);
  }
}
