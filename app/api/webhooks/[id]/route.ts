import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { updateWebhookEndpoint } from "@/db/webhooks/commands";
import { isUuid } from "@/db/users/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";
import { updateWebhookSchema } from "@/lib/integrations/webhook-signature";

type Params = { params: Promise<{ id: string }> };

// PATCH /api/webhooks/[id] – switch on or off, change events, resume after a pause; needs the version (admin)
export async function PATCH(req: Request, { params }: Params) {
  try {
    const actor = await requireUser("setup:write");
    const { id } = await params;
    if (!isUuid(id)) throw new AppError("not_found", "No such webhook endpoint.");
    const input = updateWebhookSchema.parse(await readJson(req));
    return NextResponse.json({ endpoint: await updateWebhookEndpoint(getDb(), actor.id, id, input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
