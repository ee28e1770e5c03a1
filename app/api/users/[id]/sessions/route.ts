import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { revokeAllSessions } from "@/db/auth/accounts";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// DELETE /api/users/[id]/sessions – sign the person out everywhere, at once (admin; one's own account too)
export async function DELETE(_req: Request, ctx: IdContext) {
  try {
    const actor = await requireUser("users:admin");
    const ended = await revokeAllSessions(getDb(), actor, await readId(ctx, "User"));
    return NextResponse.json({ ok: true, sessions_ended: ended, message: ended === 1 ? "1 session was signed out." : `${ended} sessions were signed out.` });
  } catch (err) {
    return toErrorResponse(err);
  }
}
