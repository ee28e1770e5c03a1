import { getDb } from "@/db/client";
import { loadCapacity } from "@/db/capacity/reads";
import { requireUser } from "@/app/_server/session";
import { capacityCsv } from "@/lib/capacity/csv";
import { capacityExportSchema } from "@/lib/capacity/schemas";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/capacity/export?from&to&table=utilization-day|utilization-week|wip|queue|orders|throughput – one table as CSV (manager, admin)
export async function GET(req: Request) {
  try {
    await requireUser("capacity:read");
    const params = Object.fromEntries(new URL(req.url).searchParams);
    const { from, to, table } = capacityExportSchema.parse(params);
    const data = await loadCapacity(getDb(), { from, to });
    const { filename, csv } = capacityCsv(data, table);
    return new Response(csv, {
      headers: {
        "content-type": "text/csv; charset=utf-8",
        "content-disposition": `attachment; filename="${filename}"`,
        "cache-control": "no-store",
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
