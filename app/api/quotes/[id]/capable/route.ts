import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getQuoteOrThrow, lineSpecOf, loadQuoteContext } from "@/db/quotes/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { capableQuerySchema } from "@/lib/quotes/schemas";
import { lineUnit, promiseInputFor } from "@/lib/quotes/evaluate";
import { maxQuantityBy } from "@/lib/quotes/promise";
import { materialYield, quantityToStart } from "@/lib/quotes/yield";
import { readId, searchParams, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/quotes/[id]/capable?by=YYYY-MM-DD – per line, how many good units the schedule allows by that date (manager, admin, technician)
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("quotes:read");
    const id = await readId(ctx, "Quote");
    const { by } = capableQuerySchema.parse(searchParams(req));
    const db = getDb();
    const { lines } = await getQuoteOrThrow(db, id);
    const qc = await loadQuoteContext(db);
    const out = lines.map((l) => {
      const spec = lineSpecOf(l);
      const m = qc.materials.get(spec.material_id)!;
      const rec = qc.yields.get(spec.material_id) ?? { good: 0, scrapped: 0 };
      const y = materialYield(rec.good, rec.scrapped, qc.rates.fallback_yield);
      const unit = lineUnit(spec, m, qc.rates);
      const r = maxQuantityBy(by.getTime(), Math.max(spec.quantity * 4, 20), (n) => promiseInputFor(spec, unit, m, qc, quantityToStart(n, y.estimate), n));
      return { line_id: l.id, name: l.name, quantity: r.quantity, completion: r.completion };
    });
    return NextResponse.json({ by: by.toISOString(), lines: out });
  } catch (err) {
    return toErrorResponse(err);
  }
}
