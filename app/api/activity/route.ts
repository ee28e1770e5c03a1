import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { countActivity, listActivity } from "@/db/activity/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { activityFilterInput, activityFilterSchema } from "@/lib/activity/schemas";

const LIMIT = 500;

// GET /api/activity?entity&kind&record&user&from&to – the newest 500 recorded changes matching the filters, with the total (manager, admin)
export async function GET(req: Request) {
  try {
    await requireUser("activity:read");
    const f = activityFilterSchema.parse(activityFilterInput(Object.fromEntries(new URL(req.url).searchParams)));
    const db = getDb();
    const [events, total] = await Promise.all([listActivity(db, f, LIMIT), countActivity(db, f)]);
    return NextResponse.json({ events, total });
  } catch (err) {
    return toErrorResponse(err);
  }
}
