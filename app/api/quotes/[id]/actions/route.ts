import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { acceptQuote, declineQuote, sendQuote } from "@/db/quotes/commands";
import { getSender } from "@/db/jobs/boss";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { floorWindowCache } from "@/lib/floor/window-cache";
import { quoteActionSchema } from "@/lib/quotes/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// POST /api/quotes/[id]/actions – send (PDF by e-mail), accept (order + plan proposal, nothing booked) or decline; one transaction each, 409 when stale or already decided (manager, admin)
export async function POST(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("quotes:write");
    const id = await readId(ctx, "Quote");
    const input = quoteActionSchema.parse(await readJson(req));
    const db = getDb();
    if (input.action === "send") {
      const boss = await getSender();
      const { quote } = await db.transaction().execute((trx) => sendQuote(boss, trx, id, input.version, user.id));
      return NextResponse.json({ quote });
    }
    if (input.action === "accept") {
      const out = await db.transaction().execute((trx) => acceptQuote(trx, id, input.version, { id: user.id, role: user.role }));
      floorWindowCache().clear();
      return NextResponse.json(out);
    }
    if (input.action === "decline") {
      return NextResponse.json({ quote: await db.transaction().execute((trx) => declineQuote(trx, id, input.version, user.id, input.reason)) });
    }
    return NextResponse.json({ error: { code: "invalid", message: "Unknown action." } }, { status: 422 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
