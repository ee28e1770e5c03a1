import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getShopSettings } from "@/db/settings/reads";
import { updateShopSettings } from "@/db/settings/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { shopSettingsSchema } from "@/lib/setup/schemas";

// GET /api/shop-settings – the shop's name, time zone, staffed hours and planning margins (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ settings: await getShopSettings(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PUT /api/shop-settings – replace the shop settings; `version` guards against lost updates (admin)
export async function PUT(req: Request) {
  try {
    await requireUser("setup:write");
    const input = shopSettingsSchema.parse(await readJson(req));
    return NextResponse.json({ settings: await updateShopSettings(getDb(), input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
