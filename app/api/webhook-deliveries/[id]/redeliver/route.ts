import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { redeliverWebhook } from "@/db/webhooks/commands";
import { isUuid } from "@/db/users/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { AppError } from "@/lib/errors";

type Params = { params: Promise<{ id: string }> };

// POST /api/webhook-deliveries/[id]/redeliver – send this delivery again, same event id (admin)
export async function POST(_req: Request, { params }: Params) {
  try {
    await requireUser("setup:write");
    const { id } = await params;
    if (!isUuid(id)) throw new AppError("not_found", "No such delivery.");
    return NextResponse.json({ delivery: await redeliverWebhook(getDb(), id) }, { status: 202 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
