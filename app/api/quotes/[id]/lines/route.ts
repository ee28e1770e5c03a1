import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { addQuoteLine } from "@/db/quotes/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { addLineSchema } from "@/lib/quotes/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// POST /api/quotes/[id]/lines – add a line from an existing part or an analysed STL upload (manager, admin)
export async function POST(req: Request, ctx: IdContext) {
  try {
    await requireUser("quotes:write");
    const id = await readId(ctx, "Quote");
    const input = addLineSchema.parse(await readJson(req));
    return NextResponse.json({ line: await getDb().transaction().execute((trx) => addQuoteLine(trx, id, input)) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
