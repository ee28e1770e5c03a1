import { NextResponse } from "next/server";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { openApiDocument } from "@/lib/api/openapi";
import { getEnv } from "@/lib/env";

let cached: { url: string; body: string } | undefined;

// GET /api/openapi.json – this description of the API, OpenAPI 3.1 (any signed-in person or token)
export async function GET() {
  try {
    await requireUser();
    const url = getEnv().APP_URL;
    // The same for every caller until the server restarts: made once from the operation list.
    if (cached?.url !== url) cached = { url, body: JSON.stringify(openApiDocument({ serverUrl: url })) };
    return new NextResponse(cached.body, { headers: { "content-type": "application/json", "cache-control": "private, max-age=300" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
