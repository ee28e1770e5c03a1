import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { setPasswordWithToken } from "@/db/auth/accounts";
import { setPasswordSchema } from "@/lib/auth/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/session/password – set a password with an e-mailed link's token (public; the token is the key)
export async function POST(req: Request) {
  try {
    const input = setPasswordSchema.parse(await readJson(req));
    const user = await setPasswordWithToken(getDb(), input.token, input.password);
    return NextResponse.json({ ok: true, email: user.email, kind: user.kind });
  } catch (err) {
    return toErrorResponse(err);
  }
}
