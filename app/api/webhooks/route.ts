import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertWebhookEndpoint } from "@/db/webhooks/commands";
import { listWebhookEndpoints } from "@/db/webhooks/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createWebhookSchema } from "@/lib/integrations/webhook-signature";

// GET /api/webhooks – registered endpoints with their waiting and failed deliveries; never the secret (admin)
export async function GET() {
  try {
    await requireUser("setup:write");
    return NextResponse.json({ endpoints: await listWebhookEndpoints(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/webhooks – register an endpoint; the answer holds its signing secret, shown this once (admin)
export async function POST(req: Request) {
  try {
    const actor = await requireUser("setup:write");
    const input = createWebhookSchema.parse(await readJson(req));
    return NextResponse.json({ endpoint: await insertWebhookEndpoint(getDb(), actor.id, input) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
