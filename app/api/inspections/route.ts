import { NextResponse } from "next/server";
import { isUuid } from "@/lib/ids";
import { getDb } from "@/db/client";
import { insertInspection } from "@/db/inspections/commands";
import { listInspectionsForUnit } from "@/db/inspections/reads";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { createInspectionSchema } from "@/lib/finishing/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/inspections?unit_id= – a unit's inspections, newest first, with attachments (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const unitId = new URL(req.url).searchParams.get("unit_id") ?? "";
    if (!isUuid(unitId)) throw new AppError("invalid", "Give the unit_id of a unit.", { unit_id: ["not a unit id"] });
    return NextResponse.json({ inspections: await listInspectionsForUnit(getDb(), unitId) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/inspections – record an inspection of a unit in finishing, at the unit's version (machinist, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("inspections:write");
    const input = createInspectionSchema.parse(await readJson(req));
    const result = await insertInspection(getDb(), input, user.id);
    return NextResponse.json(result, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
