import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { findUserByEmail } from "@/db/queries/users";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { signInSchema } from "@/lib/auth/schemas";
import { getCurrentUser, getSession } from "@/lib/auth/session";
import { HOME } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/lib/http/errors";

// One message for an unknown address and a wrong password, so neither reveals which accounts exist.
const BAD_CREDENTIALS = "That e-mail address and password do not match an active account.";

// A hash to verify against when the address is unknown, so both paths cost the same.
let dummyHash: Promise<string> | undefined;
const getDummyHash = () => (dummyHash ??= hashPassword(crypto.randomUUID()));

// GET /api/session – who is signed in (public; 401 when signed out)
export async function GET() {
  try {
    const user = await getCurrentUser();
    if (!user) throw new AppError("unauthenticated", "Not signed in.");
    return NextResponse.json({ user: { id: user.id, email: user.email, name: user.name, role: user.role, unit_pref: user.unit_pref } });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/session – sign in with e-mail and password (public)
export async function POST(req: Request) {
  try {
    const input = signInSchema.parse(await readJson(req));
    const db = getDb();
    const user = await findUserByEmail(db, input.email);
    const ok = await verifyPassword(user?.password_hash ?? (await getDummyHash()), input.password);
    if (!user || !user.active || !user.password_hash || !ok) throw new AppError("unauthenticated", BAD_CREDENTIALS);
    const session = await getSession();
    const now = Date.now();
    session.userId = user.id;
    session.issuedAt = now;
    session.seenAt = now;
    await session.save();
    return NextResponse.json({ user: { id: user.id, name: user.name, role: user.role }, home: HOME[user.role] });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// DELETE /api/session – sign out (public)
export async function DELETE() {
  try {
    const session = await getSession();
    session.destroy();
    return NextResponse.json({ ok: true });
  } catch (err) {
    return toErrorResponse(err);
  }
}
