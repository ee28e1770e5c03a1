import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { sendAccountLink } from "@/lib/auth/accounts";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";

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
