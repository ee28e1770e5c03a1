import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { calendarTokenStatus, listResources } from "@/db/capacity/reads";
import { revokeCalendarToken, rotateCalendarToken } from "@/db/capacity/commands";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { toErrorResponse } from "@/app/_server/errors";

const feedUrls = (token: string, resources: Array<{ id: string; kind: string; name: string }>) =>
  resources.map((r) => ({ ...r, url: `${getEnv().APP_URL}/api/calendar/feeds/${token}/${r.id}.ics` }));

// GET /api/calendar/token – whether the signed-in user has a calendar feed secret (manager, admin)
export async function GET() {
  try {
    const user = await requireUser("capacity:read");
    const db = getDb();
    return NextResponse.json({ ...(await calendarTokenStatus(db, user.id)), resources: await listResources(db) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/calendar/token – make a new feed secret, revoking the old one; the secret is shown only now (manager, admin)
export async function POST() {
  try {
    const user = await requireUser("capacity:read");
    const db = getDb();
    const { token, created_at } = await rotateCalendarToken(db, user.id);
    return NextResponse.json({ active: true, created_at, token, feeds: feedUrls(token, await listResources(db)) }, { status: 201, headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// DELETE /api/calendar/token – revoke the feed secret: every feed address made with it stops working (manager, admin)
export async function DELETE() {
  try {
    const user = await requireUser("capacity:read");
    const revoked = await revokeCalendarToken(getDb(), user.id);
    return NextResponse.json({ active: false, revoked });
  } catch (err) {
    return toErrorResponse(err);
  }
}
