import { getDb } from "@/db/client";
import { listCalibrationForExport } from "@/db/calibration/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { csvDownload } from "@/app/_server/csv-export";
import { calibrationExportSchema } from "@/lib/finishing/schemas";
import { CALIBRATION_CSV_FIELDS, calibrationCsvRows } from "@/lib/exports/tables";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/calibration/export?material_id – each inspection's realized shrinkage per axis, as the calibration page uses it, as formula-safe CSV (every role)
export async function GET(req: Request) {
  try {
    const user = await requireUser("shop:read");
    const f = calibrationExportSchema.parse(searchParams(req));
    const rows = (await listCalibrationForExport(getDb(), f.material_id)).flatMap((m) => calibrationCsvRows(m.material, m.rows));
    return await csvDownload({ userId: user.id, name: "calibration", fields: CALIBRATION_CSV_FIELDS, rows, filters: f, total: rows.length });
  } catch (err) {
    return toErrorResponse(err);
  }
}
