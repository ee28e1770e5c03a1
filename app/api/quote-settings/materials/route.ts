import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { upsertMaterialRate } from "@/db/quotes/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { materialRateSchema } from "@/lib/quotes/schemas";

// PUT /api/quote-settings/materials – one material's feedstock price, infill and support share (admin)
export async function PUT(req: Request) {
  try {
    await requireUser("setup:write");
    const input = materialRateSchema.parse(await readJson(req));
    return NextResponse.json({ rate: await upsertMaterialRate(getDb(), input) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
