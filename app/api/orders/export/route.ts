import { getDb } from "@/db/client";
import { listOrders } from "@/db/orders/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { csvDownload } from "@/app/_server/csv-export";
import { listOrdersSchema } from "@/lib/parts/schemas";
import { ORDER_CSV_FIELDS, allPages, orderCsvRow } from "@/lib/exports/tables";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/orders/export?search&sort&dir – every order the list's filters and sort select, as formula-safe CSV (every role)
export async function GET(req: Request) {
  try {
    const user = await requireUser("shop:read");
    const q = listOrdersSchema.parse(searchParams(req));
    const db = getDb();
    const { rows, total } = await allPages((page, page_size) => listOrders(db, { ...q, page, page_size }), 200, 20_000);
    return await csvDownload({ userId: user.id, name: "orders", fields: ORDER_CSV_FIELDS, rows: rows.map(orderCsvRow), filters: { search: q.search, sort: q.sort, dir: q.dir }, total });
  } catch (err) {
    return toErrorResponse(err);
  }
}
