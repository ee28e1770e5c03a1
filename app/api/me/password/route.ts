import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { changeOwnPassword } from "@/db/auth/accounts";
import { changePasswordSchema } from "@/lib/auth/schemas";
import { requestAddress, requireUser, startSession } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/me/password – change my password; ends my other sessions (any signed-in role)
export async function POST(req: Request) {
  try {
    const user = await requireUser("self:write");
    const input = changePasswordSchema.parse(await readJson(req));
    const cutoff = await changeOwnPassword(getDb(), user, input.current_password, input.new_password, await requestAddress());
    await startSession(user.id, cutoff);
    return NextResponse.json({ ok: true, message: "Password changed. Other sessions have been signed out." });
  } catch (err) {
    const res = toErrorResponse(err);
    if (err instanceof AppError && err.status === 429) res.headers.set("Retry-After", String(err.details?.retry_after_s ?? 900));
    return res;
  }
}
