import { getDb } from "@/db/client";
import { findCalendarUser, findResource, listBookings, listMaintenance, loadShopClock } from "@/db/capacity/reads";
import { can } from "@/lib/auth/permissions";
import { resourceFeed } from "@/lib/capacity/ical";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";

const DAY = 86_400_000;

// GET /api/calendar/feeds/[token]/[resource].ics – one resource's bookings as iCalendar; the secret in the address stands in for a session (manager, admin)
export async function GET(_req: Request, { params }: { params: Promise<{ token: string; resource: string }> }) {
  try {
    const { token, resource } = await params;
    const db = getDb();
    // Calendar programs fetch without a session, so the feed secret is the credential; the
    // owner's role is read again on every fetch so that a demotion ends the feed at once.
    const user = await findCalendarUser(db, token);
    if (!user || !can(user.role, "capacity:read")) throw new AppError("not_found", "No such calendar feed.");
    const target = await findResource(db, resource.replace(/\.ics$/, ""));
    if (!target) throw new AppError("not_found", "No such resource.");
    const now = new Date();
    // The recent past for context and everything booked ahead, however far.
    const from = new Date(now.getTime() - 60 * DAY);
    const to = new Date(now.getTime() + 10 * 365 * DAY);
    const [clock, bookings, maintenance] = await Promise.all([
      loadShopClock(db),
      listBookings(db, from, to, target.id),
      listMaintenance(db, from, to, target.id),
    ]);
    const body = resourceFeed({ shopName: clock.shop_name, resource: target, bookings, maintenance, appUrl: getEnv().APP_URL, now });
    return new Response(body, {
      headers: {
        "content-type": "text/calendar; charset=utf-8",
        "content-disposition": `inline; filename="${target.name.replace(/[^A-Za-z0-9_-]+/g, "-")}.ics"`,
        "cache-control": "private, max-age=300",
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
