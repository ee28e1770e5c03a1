import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { applyCalibration } from "@/db/calibration/commands";
import { requireUser } from "@/app/_server/session";
import { applyCalibrationSchema } from "@/lib/finishing/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/calibration/[materialId]/apply – set the material's shrinkage to the measured means shown, at the material's version (admin)
export async function POST(req: Request, { params }: { params: Promise<{ materialId: string }> }) {
  try {
    const user = await requireUser("calibration:apply");
    const { materialId } = await params;
    const input = applyCalibrationSchema.parse(await readJson(req));
    return NextResponse.json(await applyCalibration(getDb(), materialId, input, user.id));
  } catch (err) {
    return toErrorResponse(err);
  }
}
