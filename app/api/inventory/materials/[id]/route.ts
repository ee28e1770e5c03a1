import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { updateMaterialStockRules } from "@/db/inventory/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { materialInventorySchema } from "@/lib/inventory/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// PATCH /api/inventory/materials/[id] – a material's supports allowance, purge, reorder point and lead time, with its version (technician, manager, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("inventory:write");
    const id = await readId(ctx, "Material");
    const input = materialInventorySchema.parse(await readJson(req));
    return NextResponse.json({ material: await updateMaterialStockRules(getDb(), id, input, user.id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
