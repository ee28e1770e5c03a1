import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertPart } from "@/db/parts/commands";
import { listParts } from "@/db/parts/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createPartSchema, listPartsSchema } from "@/lib/parts/schemas";
import { searchParams } from "@/app/api/builds/_helpers";

// GET /api/parts – parts with order, material and geometry status; sort, filter, search, pages (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const q = listPartsSchema.parse(searchParams(req));
    return NextResponse.json(await listParts(getDb(), q));
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/parts – add a part to an order, scaled up, with its planned units (technician, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("parts:write");
    const input = createPartSchema.parse(await readJson(req));
    const part = await getDb().transaction().execute((trx) => insertPart(trx, input, user.id));
    return NextResponse.json({ part }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
