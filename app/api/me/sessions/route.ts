import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { revokeOtherSessions } from "@/db/auth/accounts";
import { listOpenSessions } from "@/db/auth/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/me/sessions – one's open sessions, this one marked (any signed-in role)
export async function GET() {
  try {
    const user = await requireUser("self:write");
    const sessions = await listOpenSessions(getDb(), user.id);
    return NextResponse.json({ sessions: sessions.map((s) => ({ ...s, current: s.id === user.session_id })) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// DELETE /api/me/sessions – sign out of every other browser and device, at once (any signed-in role)
export async function DELETE() {
  try {
    const user = await requireUser("self:write");
    const ended = await revokeOtherSessions(getDb(), user);
    return NextResponse.json({ ok: true, sessions_ended: ended, message: ended ? `Signed out of ${ended} other session${ended === 1 ? "" : "s"}.` : "There were no other sessions." });
  } catch (err) {
    return toErrorResponse(err);
  }
}
