import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listUsers } from "@/db/users/reads";
import { createUserAndInvite } from "@/db/auth/accounts";
import { createUserSchema } from "@/lib/auth/schemas";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/users – every account with its role and state (admin)
export async function GET() {
  try {
    await requireUser("users:admin");
    return NextResponse.json({ users: await listUsers(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/users – create an account and e-mail its invitation (admin)
export async function POST(req: Request) {
  try {
    const actor = await requireUser("users:admin");
    const input = createUserSchema.parse(await readJson(req));
    const result = await createUserAndInvite(getDb(), actor, input);
    return NextResponse.json(result, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
