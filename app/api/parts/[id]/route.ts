import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getPartDetail } from "@/db/parts/reads";
import { updatePart } from "@/db/parts/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updatePartSchema } from "@/lib/parts/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/parts/[id] – the part with its scale-up, masses, printer fits and geometry (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    return NextResponse.json(await getPartDetail(getDb(), await readId(ctx, "Part")));
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/parts/[id] – edit a part with its version; sizes re-scale, quantity adds or removes planned units (technician, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("parts:write");
    const id = await readId(ctx, "Part");
    const input = updatePartSchema.parse(await readJson(req));
    const part = await getDb().transaction().execute((trx) => updatePart(trx, id, input, user.id));
    return NextResponse.json({ part });
  } catch (err) {
    return toErrorResponse(err);
  }
}
