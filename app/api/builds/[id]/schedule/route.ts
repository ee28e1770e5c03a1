import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { scheduleBuild, scheduleContext } from "@/db/builds/commands";
import { requireUser } from "@/app/_server/session";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { scheduleBuildSchema } from "@/lib/builds/schemas";
import { readId, type IdContext } from "../../_helpers";

// PATCH /api/builds/[id]/schedule – move a build onto a printer at a start time, or off the floor (printer_id null), with its version; 409 on a stale version or an overlap, 422 on an incompatible printer (technician, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("builds:schedule");
    const id = await readId(ctx, "Build");
    const input = scheduleBuildSchema.parse(await readJson(req));
    // The printers and the plate clearance, read before the transaction and side by side (as
    // withBatchTransaction reads the shop's context): the build and its printer are still locked
    // and the version checked inside it.
    const db = getDb();
    const judged = input.printer_id === null ? {} : await scheduleContext(db);
    const { build } = await db.transaction().execute((trx) => scheduleBuild(trx, id, input, user.id, judged));
    floorWindowCache().clear();
    return NextResponse.json({
      build: {
        id: build.id, code: build.code, state: build.state, version: build.version, printer_id: build.printer_id,
        starts_at: build.starts_at, ends_at: build.ends_at, est_minutes: build.est_minutes === null ? null : Number(build.est_minutes),
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
