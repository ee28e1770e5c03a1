import { getDb } from "@/db/client";
import { listUnits } from "@/db/units/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { csvDownload } from "@/app/_server/csv-export";
import { listUnitsSchema } from "@/lib/parts/schemas";
import { UNIT_CSV_FIELDS, allPages, unitCsvRow } from "@/lib/exports/tables";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/units/export?state&part_id&order_id&material_id&unbuilt&search&sort&dir – every unit the list's filters select, with its build, wash and furnace run, as formula-safe CSV (every role)
export async function GET(req: Request) {
  try {
    const user = await requireUser("shop:read");
    const q = listUnitsSchema.parse(searchParams(req));
    const db = getDb();
    const { rows, total } = await allPages((page, page_size) => listUnits(db, { ...q, page, page_size }), 200, 20_000);
    const { page: _p, page_size: _s, ...filters } = q;
    void _p, void _s;
    return await csvDownload({ userId: user.id, name: "units", fields: UNIT_CSV_FIELDS, rows: rows.map(unitCsvRow), filters, total });
  } catch (err) {
    return toErrorResponse(err);
  }
}
