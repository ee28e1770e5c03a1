import { getDb } from "@/db/client";
import { loadCapacity } from "@/db/capacity/reads";
import { requestAddress, requireUser } from "@/app/_server/session";
import { insertUserEvent } from "@/db/auth/commands";
import { capacityCsv } from "@/lib/capacity/csv";
import { capacityExportSchema } from "@/lib/capacity/schemas";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/capacity/export?from&to&table=utilization-day|utilization-week|wip|queue|orders|throughput – one table as CSV (manager, admin)
export async function GET(req: Request) {
  try {
    const user = await requireUser("capacity:read");
    const params = Object.fromEntries(new URL(req.url).searchParams);
    const { from, to, table } = capacityExportSchema.parse(params);
    const data = await loadCapacity(getDb(), { from, to });
    const { filename, csv } = capacityCsv(data, table);
    await insertUserEvent(getDb(), { user_id: user.id, kind: "export", actor_id: user.id, reason: `capacity ${table}`, data: { from, to, table, ip: await requestAddress() } });
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
