import { getDb } from "@/db/client";
import { listInspectionsForExport } from "@/db/inspections/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { csvDownload } from "@/app/_server/csv-export";
import { inspectionExportSchema } from "@/lib/finishing/schemas";
import { INSPECTION_CSV_FIELDS, inspectionCsvRow } from "@/lib/exports/tables";
import { searchParams } from "@/app/api/builds/_helpers";

// At most this many lines in one file; filter by material or unit for the rest.
const MAX_ROWS = 20_000;

// GET /api/inspections/export?unit_id&material_id – the inspections of one unit, one material or all, newest first, as formula-safe CSV (every role)
export async function GET(req: Request) {
  try {
    const user = await requireUser("shop:read");
    const f = inspectionExportSchema.parse(searchParams(req));
    const { rows, total } = await listInspectionsForExport(getDb(), f, MAX_ROWS);
    return await csvDownload({ userId: user.id, name: "inspections", fields: INSPECTION_CSV_FIELDS, rows: rows.map(inspectionCsvRow), filters: f, total });
  } catch (err) {
    return toErrorResponse(err);
  }
}
