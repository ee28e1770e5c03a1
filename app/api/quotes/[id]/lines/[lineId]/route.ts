import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { removeQuoteLine } from "@/db/quotes/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { removeLineSchema } from "@/lib/quotes/schemas";
import { readId } from "@/app/api/builds/_helpers";

type LineContext = { params: Promise<{ id: string; lineId: string }> };

// DELETE /api/quotes/[id]/lines/[lineId] – take a line off a draft (body: { version }) (manager, admin)
export async function DELETE(req: Request, ctx: LineContext) {
  try {
    await requireUser("quotes:write");
    const { id: rawId, lineId: rawLine } = await ctx.params;
    const id = await readId({ params: Promise.resolve({ id: rawId }) }, "Quote");
    const lineId = await readId({ params: Promise.resolve({ id: rawLine }) }, "Quote line");
    const { version } = removeLineSchema.parse(await readJson(req));
    await getDb().transaction().execute((trx) => removeQuoteLine(trx, id, lineId, version));
    return NextResponse.json({ ok: true });
  } catch (err) {
    return toErrorResponse(err);
  }
}
