import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getBuildDetail } from "@/db/builds/reads";
import { updateBuild } from "@/db/builds/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updateBuildSchema } from "@/lib/builds/schemas";
import { readId, type IdContext } from "../_helpers";

// GET /api/builds/[id] – the build, its units, plate layout, each printer's verdict and history (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    return NextResponse.json(await getBuildDetail(getDb(), await readId(ctx, "Build")));
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/builds/[id] – material lot, notes, or (for a draft) its units, with the version (technician, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("builds:write");
    const id = await readId(ctx, "Build");
    const input = updateBuildSchema.parse(await readJson(req));
    const build = await getDb().transaction().execute((trx) => updateBuild(trx, id, input, user.id));
    return NextResponse.json({ build });
  } catch (err) {
    return toErrorResponse(err);
  }
}
