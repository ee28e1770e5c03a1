import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { sendAccountLink } from "@/db/auth/accounts";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

type Params = { params: Promise<{ id: string }> };

// POST /api/users/[id]/link – e-mail a reset link (or a fresh invitation when no password is set yet) (admin)
export async function POST(_req: Request, { params }: Params) {
  try {
    const actor = await requireUser("users:admin");
    const { id } = await params;
    const result = await sendAccountLink(getDb(), actor, id);
    return NextResponse.json(result, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
