import { NextResponse } from "next/server";
import { isUuid } from "@/lib/ids";
import { getDb } from "@/db/client";
import { setCalibrationExclusion } from "@/db/inspections/commands";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { excludeInspectionSchema } from "@/lib/finishing/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// PATCH /api/inspections/[id] – leave a measurement out of shrinkage calibration, or take it back in (admin)
export async function PATCH(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("calibration:apply");
    const { id } = await params;
    if (!isUuid(id)) throw new AppError("not_found", "Inspection not found.");
    const input = excludeInspectionSchema.parse(await readJson(req));
    return NextResponse.json(await setCalibrationExclusion(getDb(), id, input.excluded_from_calibration, input.reason, user.id));
  } catch (err) {
    return toErrorResponse(err);
  }
}
