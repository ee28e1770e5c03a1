import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertOrder } from "@/db/orders/commands";
import { listOrders } from "@/db/orders/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createOrderSchema, listOrdersSchema } from "@/lib/parts/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/orders – orders with part and unit counts and projected completion; sort, search, pages (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const q = listOrdersSchema.parse(searchParams(req));
    return NextResponse.json(await listOrders(getDb(), q));
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/orders – create an order (technician, manager, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("orders:write");
    const input = createOrderSchema.parse(await readJson(req));
    return NextResponse.json({ order: await insertOrder(getDb(), input, user.role) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
