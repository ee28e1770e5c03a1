import { getDb } from "@/db/client";
import { getLotOrThrow, lotGenealogy } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { genealogyCsv } from "@/lib/inventory/csv";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/inventory/lots/[id]/genealogy – every unit the lot reached, with its path and order, as CSV (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Feedstock lot");
    const db = getDb();
    const lot = await getLotOrThrow(db, id);
    return new Response(genealogyCsv(await lotGenealogy(db, id)), {
      headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="${lot.code}-genealogy.csv"` },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
