import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { proposePrinterPlan } from "@/db/builds/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { proposePlanSchema } from "@/lib/floor/schemas";

// POST /api/plans – propose a printer plan for the unscheduled builds; nothing is booked until it is applied (technician, manager, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("plan:propose");
    const input = proposePlanSchema.parse(await readJson(req));
    return NextResponse.json(await proposePrinterPlan(getDb(), input, user.id), { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
