import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { updateOwnProfile } from "@/db/auth/accounts";
import { updateProfileSchema } from "@/lib/auth/schemas";
import { getCurrentUser, requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { findActiveUserById } from "@/db/users/reads";

function profile(u: { id: string; email: string; name: string; role: string; unit_pref: string; muted_mail: string[] }) {
  return { id: u.id, email: u.email, name: u.name, role: u.role, unit_pref: u.unit_pref, muted_mail: u.muted_mail };
}

// GET /api/me – my own profile and preferences (any signed-in role)
export async function GET() {
  try {
    const user = await requireUser("self:write");
    return NextResponse.json({ user: profile(user) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/me – change my name, unit preference or muted e-mail kinds (any signed-in role)
export async function PATCH(req: Request) {
  try {
    const user = await requireUser("self:write");
    const input = updateProfileSchema.parse(await readJson(req));
    const db = getDb();
    await updateOwnProfile(db, user, input);
    const fresh = (await findActiveUserById(db, user.id)) ?? (await getCurrentUser())!;
    return NextResponse.json({ user: profile(fresh) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
