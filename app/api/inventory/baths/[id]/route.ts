import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { recordBathChange } from "@/db/inventory/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { bathChangeSchema } from "@/lib/inventory/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// POST /api/inventory/baths/[id] – the solvent at this wash station was changed: its binder load starts again from zero (technician, furnace operator, admin)
export async function POST(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("consumables:write");
    const id = await readId(ctx, "Wash station");
    const input = bathChangeSchema.parse(await readJson(req));
    return NextResponse.json({ station: await recordBathChange(getDb(), id, input, user.id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
