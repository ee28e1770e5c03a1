import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { revokeApiToken } from "@/db/api-tokens/commands";
import { isUuid } from "@/db/users/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";

type Params = { params: Promise<{ id: string }> };

// DELETE /api/api-tokens/[id] – revoke a token; it stops working on its next request (admin)
export async function DELETE(_req: Request, { params }: Params) {
  try {
    const actor = await requireUser("users:admin");
    const { id } = await params;
    if (!isUuid(id)) throw new AppError("not_found", "No such API token.");
    return NextResponse.json({ token: await revokeApiToken(getDb(), actor.id, id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
