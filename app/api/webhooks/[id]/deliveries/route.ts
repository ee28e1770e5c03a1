import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listWebhookDeliveries } from "@/db/webhooks/reads";
import { isUuid } from "@/db/users/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";

type Params = { params: Promise<{ id: string }> };

// GET /api/webhooks/[id]/deliveries – the endpoint's delivery log, newest first (admin)
export async function GET(_req: Request, { params }: Params) {
  try {
    await requireUser("setup:write");
    const { id } = await params;
    if (!isUuid(id)) throw new AppError("not_found", "No such webhook endpoint.");
    return NextResponse.json({ deliveries: await listWebhookDeliveries(getDb(), { endpointId: id }) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
