import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertApiToken } from "@/db/api-tokens/commands";
import { listApiTokens } from "@/db/api-tokens/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createApiTokenSchema } from "@/lib/auth/api-scopes";

// Tokens are managed by a signed-in admin only: "users:admin" is never in a token's scopes.

// GET /api/api-tokens – every token with its scopes, expiry, last use; never the token (admin)
export async function GET() {
  try {
    await requireUser("users:admin");
    return NextResponse.json({ tokens: await listApiTokens(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/api-tokens – create a token; the answer holds the token, shown this once (admin)
export async function POST(req: Request) {
  try {
    const actor = await requireUser("users:admin");
    const input = createApiTokenSchema.parse(await readJson(req));
    return NextResponse.json({ token: await insertApiToken(getDb(), actor.id, input) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
