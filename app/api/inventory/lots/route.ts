import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { receiveLot } from "@/db/inventory/commands";
import { listLots } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { listLotsQuerySchema, receiveLotSchema } from "@/lib/inventory/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/inventory/lots – feedstock lots, filtered by material, state or text (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ lots: await listLots(getDb(), listLotsQuerySchema.parse(searchParams(req))) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/inventory/lots – receive a lot into quarantine (technician, manager, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("inventory:write");
    const input = receiveLotSchema.parse(await readJson(req));
    return NextResponse.json({ lot: await receiveLot(getDb(), input, user.id) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
