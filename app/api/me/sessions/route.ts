import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { revokeOtherSessions } from "@/db/auth/accounts";
import { requireUser, startSession } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// DELETE /api/me/sessions – sign out of every other browser and device (any signed-in role)
export async function DELETE() {
  try {
    const user = await requireUser("self:write");
    const cutoff = await revokeOtherSessions(getDb(), user);
    await startSession(user.id, cutoff);
    return NextResponse.json({ ok: true, message: "Every other session has been signed out." });
  } catch (err) {
    return toErrorResponse(err);
  }
}
