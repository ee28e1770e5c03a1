import { NextResponse, after } from "next/server";
import { getDb } from "@/db/client";
import { FORGOT_ANSWER, requestPasswordReset } from "@/db/auth/accounts";
import { forgotPasswordSchema } from "@/lib/auth/schemas";
import { requestAddress } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { sendOutboxRow } from "@/db/notifications/send";

// POST /api/session/reset-requests – e-mail a reset link (public; same answer for any address)
export async function POST(req: Request) {
  try {
    const { email } = forgotPasswordSchema.parse(await readJson(req));
    const db = getDb();
    const outboxId = await requestPasswordReset(db, email, await requestAddress());
    // Sent after the answer, so its timing does not tell whether the account exists; a failed
    // send stays pending in the outbox for the worker.
    if (outboxId) after(() => sendOutboxRow(db, outboxId).then(() => undefined, (err) => console.error("[mail] reset link", err)));
    return NextResponse.json({ ok: true, message: FORGOT_ANSWER }, { status: 202 });
  } catch (err) {
    const res = toErrorResponse(err);
    if (err instanceof AppError && err.status === 429) res.headers.set("Retry-After", String(err.details?.retry_after_s ?? 900));
    return res;
  }
}
