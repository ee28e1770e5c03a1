import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { liveHub } from "@/app/_server/live-hub";

// GET /api/events – server-sent events: which bookings, units and inspections changed (ids and
// versions only), for every signed-in role that may see the shop (the same check as its pages).
// The page then refetches what it shows (components/live/). Last-Event-ID (or ?lastEventId= from
// a page that reconnects by itself) replays what this process sent since.
export const dynamic = "force-dynamic";
export const runtime = "nodejs";

export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
  } catch (err) {
    return toErrorResponse(err);
  }
  const hub = liveHub();
  hub.start();
  const lastEventId = req.headers.get("last-event-id") ?? new URL(req.url).searchParams.get("lastEventId");
  return new Response(hub.open(req.signal, lastEventId), {
    headers: {
      "content-type": "text/event-stream; charset=utf-8",
      // no-transform: neither the web server's compression nor a proxy may hold bytes back.
      "cache-control": "no-cache, no-transform",
      // nginx buffers proxied responses unless told otherwise.
      "x-accel-buffering": "no",
      connection: "keep-alive",
    },
  });
}
