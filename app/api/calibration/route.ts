import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listCalibrationMaterials } from "@/db/calibration/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/calibration – materials with their current shrinkage and how many inspections back it (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ materials: await listCalibrationMaterials(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
