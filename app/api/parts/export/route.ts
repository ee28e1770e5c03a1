import { getDb } from "@/db/client";
import { listParts } from "@/db/parts/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { csvDownload } from "@/app/_server/csv-export";
import { listPartsSchema } from "@/lib/parts/schemas";
import { PART_CSV_FIELDS, allPages, partCsvRow } from "@/lib/exports/tables";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/parts/export?order_id&material_id&search&sort&dir – every part the list's filters and sort select, as formula-safe CSV (every role)
export async function GET(req: Request) {
  try {
    const user = await requireUser("shop:read");
    const q = listPartsSchema.parse(searchParams(req));
    const db = getDb();
    const { rows, total } = await allPages((page, page_size) => listParts(db, { ...q, page, page_size }), 200, 20_000);
    const { page: _p, page_size: _s, ...filters } = q;
    void _p, void _s;
    return await csvDownload({ userId: user.id, name: "parts", fields: PART_CSV_FIELDS, rows: rows.map(partCsvRow), filters, total });
  } catch (err) {
    return toErrorResponse(err);
  }
}
