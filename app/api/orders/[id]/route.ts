import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getOrderOrThrow } from "@/db/orders/reads";
import { updateOrder } from "@/db/orders/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updateOrderSchema } from "@/lib/parts/schemas";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/orders/[id] – one order (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ order: await getOrderOrThrow(getDb(), await readId(ctx, "Order")) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PATCH /api/orders/[id] – edit an order with its version; priority only by a manager or admin (technician, manager, admin)
export async function PATCH(req: Request, ctx: IdContext) {
  try {
    const user = await requireUser("orders:write");
    const id = await readId(ctx, "Order");
    const input = updateOrderSchema.parse(await readJson(req));
    const order = await updateOrder(getDb(), id, input, user.role);
    return NextResponse.json({ order });
  } catch (err) {
    return toErrorResponse(err);
  }
}
