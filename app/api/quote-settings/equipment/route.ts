import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { setEquipmentRate } from "@/db/quotes/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { equipmentRateSchema } from "@/lib/quotes/schemas";

// PUT /api/quote-settings/equipment – one printer's hourly rate or one furnace's run, gas and energy cost; empty = the shop's (admin)
export async function PUT(req: Request) {
  try {
    await requireUser("setup:write");
    const input = equipmentRateSchema.parse(await readJson(req));
    return NextResponse.json({ rate: await setEquipmentRate(getDb(), input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
