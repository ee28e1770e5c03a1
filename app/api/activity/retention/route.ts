import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getActivityRetention } from "@/db/activity/reads";
import { setActivityRetention } from "@/db/activity/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { activityRetentionSchema } from "@/lib/activity/schemas";

// GET /api/activity/retention – how many days the activity log keeps its events; null: for ever (manager, admin)
export async function GET() {
  try {
    await requireUser("activity:read");
    return NextResponse.json({ retention_days: await getActivityRetention(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PUT /api/activity/retention – set it: 30 to 3650 days, or null to keep events for ever (admin)
export async function PUT(req: Request) {
  try {
    const user = await requireUser("setup:write");
    const input = activityRetentionSchema.parse(await readJson(req));
    return NextResponse.json({ retention_days: await setActivityRetention(getDb(), user.id, input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
