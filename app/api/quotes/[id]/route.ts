import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { evaluateQuoteNow, expireQuotes, updateQuote } from "@/db/quotes/commands";
import { getQuoteOrThrow } from "@/db/quotes/reads";
import { getShopPlanning } from "@/db/floor/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updateQuoteSchema } from "@/lib/quotes/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/quotes/[id] – the quote, its lines and, for a draft, the cost and promise as the schedule stands now; a sent quote shows what was sent (manager, admin, technician)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("quotes:read");
    const id = await readId(ctx, "Quote");
    const db = getDb();
    await expireQuotes(db);
    const detail = await getQuoteOrThrow(db, id);
    const shop = await getShopPlanning(db);
    const evaluated = detail.quote.status === "draft" ? await evaluateQuoteNow(db, id) : detail.quote.cost;
    return NextResponse.json({ ...detail, evaluated, time_zone: shop.time_zone });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/quotes/[id] – edit a draft's customer, contact, notes or validity; 409 when stale (manager, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    await requireUser("quotes:write");
    const id = await readId(ctx, "Quote");
    const input = updateQuoteSchema.parse(await readJson(req));
    return NextResponse.json({ quote: await getDb().transaction().execute((trx) => updateQuote(trx, id, input)) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
