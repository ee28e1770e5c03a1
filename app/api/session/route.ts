import { NextResponse } from "next/server";
import { cookies } from "next/headers";
import { getDb } from "@/db/client";
import { recordSignOut, signInWithPassword } from "@/db/auth/accounts";
import { HOME } from "@/lib/auth/permissions";
import { signInSchema } from "@/lib/auth/schemas";
import { SESSION_COOKIE, endSession, getCurrentUser, requestAddress, startSession } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";

/** A 429 says when to come back, in the message and in Retry-After. */
function withRetryAfter(err: unknown) {
  const res = toErrorResponse(err);
  const wait = err instanceof AppError ? Number(err.details?.retry_after_s) : NaN;
  if (res.status === 429 && Number.isFinite(wait)) res.headers.set("Retry-After", String(wait));
  return res;
}

// GET /api/session – who is signed in (public; 401 when signed out)
export async function GET() {
  try {
    const user = await getCurrentUser();
    if (!user) throw new AppError("unauthenticated", "Not signed in.");
    return NextResponse.json({ user: { id: user.id, email: user.email, name: user.name, role: user.role, unit_pref: user.unit_pref }, home: HOME[user.role] });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/session – sign in with e-mail and password (public; throttled per account and address)
export async function POST(req: Request) {
  try {
    const input = signInSchema.parse(await readJson(req));
    const user = await signInWithPassword(getDb(), { ...input, ip: await requestAddress() });
    await startSession(user.id);
    return NextResponse.json({ user, home: HOME[user.role] });
  } catch (err) {
    return withRetryAfter(err);
  }
}

// DELETE /api/session – sign out (public; always succeeds, even with a damaged cookie)
export async function DELETE() {
  try {
    const user = await getCurrentUser();
    if (user) await recordSignOut(getDb(), user.id, await requestAddress());
    try {
      await endSession();
    } catch {
      (await cookies()).delete(SESSION_COOKIE);
    }
    return NextResponse.json({ ok: true });
  } catch (err) {
    return toErrorResponse(err);
  }
}
