import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { recordGasCount } from "@/db/inventory/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { gasCountSchema } from "@/lib/inventory/schemas";

// POST /api/inventory/gas – record a count of a process gas on hand, in litres (technician, furnace operator, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("consumables:write");
    const input = gasCountSchema.parse(await readJson(req));
    return NextResponse.json({ supply: await recordGasCount(getDb(), input, user.id) }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
