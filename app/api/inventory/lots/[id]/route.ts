import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { updateLot } from "@/db/inventory/commands";
import { getLotOrThrow, lotGenealogy } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updateLotSchema } from "@/lib/inventory/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/inventory/lots/[id] – one lot with every unit and order it reached (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Feedstock lot");
    const db = getDb();
    const [lot, genealogy] = await Promise.all([getLotOrThrow(db, id), lotGenealogy(db, id)]);
    return NextResponse.json({ lot, genealogy });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/inventory/lots/[id] – release, reject or requarantine, count what is left, notes, expiry, certificate; with its version (technician, manager, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("inventory:write");
    const id = await readId(ctx, "Feedstock lot");
    const input = updateLotSchema.parse(await readJson(req));
    return NextResponse.json({ lot: await updateLot(getDb(), id, input, user.id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
