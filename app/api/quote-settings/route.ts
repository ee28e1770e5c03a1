import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { updateQuoteSettings } from "@/db/quotes/commands";
import { getQuoteSettings, listEquipmentRates, listMaterialRates } from "@/db/quotes/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { quoteSettingsSchema } from "@/lib/quotes/schemas";

// GET /api/quote-settings – quoting rates, currency, per-material feedstock rates and per-printer and per-furnace rates (manager, admin, technician)
export async function GET() {
  try {
    await requireUser("quotes:read");
    const db = getDb();
    const [settings, materials, equipment] = await Promise.all([getQuoteSettings(db), listMaterialRates(db), listEquipmentRates(db)]);
    return NextResponse.json({ settings, materials, printers: equipment.printers, furnaces: equipment.furnaces });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PUT /api/quote-settings – change the shop's quoting rates; 409 when someone changed them first (admin)
export async function PUT(req: Request) {
  try {
    await requireUser("setup:write");
    const input = quoteSettingsSchema.parse(await readJson(req));
    return NextResponse.json({ settings: await getDb().transaction().execute((trx) => updateQuoteSettings(trx, input)) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
