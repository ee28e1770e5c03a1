import { getDb } from "@/db/client";
import { getQuoteOrThrow } from "@/db/quotes/reads";
import { getShopPlanning } from "@/db/floor/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";
import { quotePdf } from "@/lib/quotes/pdf";
import type { EvaluatedQuote } from "@/lib/quotes/evaluate";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/quotes/[id]/pdf – the PDF as sent to the customer (manager, admin, technician)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("quotes:read");
    const id = await readId(ctx, "Quote");
    const db = getDb();
    const { quote: q, lines } = await getQuoteOrThrow(db, id);
    const ev = q.cost as unknown as EvaluatedQuote | null;
    if (!ev || !q.promise_at || !q.promise_p90_at || q.total_minor === null) throw new AppError("conflict", "The PDF exists once the quote is sent.");
    const shop = await getShopPlanning(db);
    const pdf = await quotePdf({
      shop_name: shop.shop_name, code: q.code, customer: q.customer, contact_email: q.contact_email, currency: q.currency, minor_digits: q.minor_digits,
      lines: ev.lines.map((l, i) => ({ name: l.name, material: lines[i]?.material_code ?? "", quantity: l.quantity, unit_price_minor: l.cost?.unit_price_minor ?? 0, total_minor: l.cost?.total_minor ?? 0, finishing: "", requested: null })),
      setup_minor: ev.setup_minor, total_minor: q.total_minor, valid_until: new Date(q.valid_until), promise_at: new Date(q.promise_at), promise_p90_at: new Date(q.promise_p90_at),
      time_zone: shop.time_zone, notes: q.notes, issued_at: new Date(q.sent_at ?? q.created_at),
    });
    return new Response(Buffer.from(pdf), { headers: { "content-type": "application/pdf", "content-disposition": `inline; filename="quote-${q.code}.pdf"`, "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
