import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listUserEvents } from "@/db/auth/reads";
import { findUserById } from "@/db/users/reads";
import { updateUserByAdmin } from "@/db/auth/accounts";
import { updateUserSchema } from "@/lib/auth/schemas";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { readJson, toErrorResponse } from "@/app/_server/errors";

type Params = { params: Promise<{ id: string }> };

// GET /api/users/[id] – one account and its recent account events (admin)
export async function GET(_req: Request, { params }: Params) {
  try {
    await requireUser("users:admin");
    const { id } = await params;
    const db = getDb();
    const user = await findUserById(db, id);
    if (!user) throw new AppError("not_found", "No such user.");
    return NextResponse.json({ user, events: await listUserEvents(db, id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/users/[id] – change name, role or active state; needs the current version (admin)
export async function PATCH(req: Request, { params }: Params) {
  try {
    const actor = await requireUser("users:admin");
    const { id } = await params;
    const input = updateUserSchema.parse(await readJson(req));
    const db = getDb();
    if (!(await findUserById(db, id))) throw new AppError("not_found", "No such user.");
    return NextResponse.json({ user: await updateUserByAdmin(db, actor, id, input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
