import { getDb } from "@/db/client";
import { listActivity } from "@/db/activity/reads";
import { insertUserEvent } from "@/db/auth/commands";
import { requestAddress, requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { ACTIVITY_CSV_FIELDS, activityCsvRow, activityFilterInput, activityFilterSchema } from "@/lib/activity/schemas";
import { toCsv } from "@/lib/csv/safe-cell";

// At most this many lines in one file; narrow the filters (dates) for more.
const MAX_ROWS = 50_000;

// GET /api/activity/export?entity&kind&record&user&from&to – the matching changes as CSV, formula-safe, newest first (manager, admin)
export async function GET(req: Request) {
  try {
    const user = await requireUser("activity:read");
    const f = activityFilterSchema.parse(activityFilterInput(Object.fromEntries(new URL(req.url).searchParams)));
    const rows = await listActivity(getDb(), f, MAX_ROWS);
    const csv = toCsv(ACTIVITY_CSV_FIELDS, rows.map(activityCsvRow));
    await insertUserEvent(getDb(), { user_id: user.id, kind: "export", actor_id: user.id, reason: "activity log", data: { ...f, rows: rows.length, ip: await requestAddress() } });
    return new Response(csv, {
      headers: {
        "content-type": "text/csv; charset=utf-8",
        "content-disposition": `attachment; filename="activity-${new Date().toISOString().slice(0, 10)}.csv"`,
        "cache-control": "no-store",
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
