import { getDb } from "@/db/client";
import { getLotOrThrow } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { getEnv } from "@/lib/env";
import { lotLabelPdf } from "@/lib/inventory/label";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/inventory/lots/[id]/label – the container label PDF with a QR code that opens the lot (every role)
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Feedstock lot");
    const lot = await getLotOrThrow(getDb(), id);
    const base = getEnv().APP_URL || new URL(req.url).origin;
    const pdf = await lotLabelPdf({
      url: `${base.replace(/\/$/, "")}/inventory/${id}`, code: lot.code, material: `${lot.material_code} ${lot.material_name}`, supplier: lot.supplier, supplier_lot: lot.supplier_lot,
      form: lot.form, received_on: lot.received_on, expires_on: lot.expires_on, quantity_kg: lot.quantity_g / 1000, state: lot.state,
    });
    return new Response(Buffer.from(pdf), { headers: { "content-type": "application/pdf", "content-disposition": `inline; filename="${lot.code}-label.pdf"` } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
