import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listCalibrationMaterials } from "@/db/queries/calibration";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";

// GET /api/calibration – materials with their current shrinkage and how many inspections back it (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json({ materials: await listCalibrationMaterials(getDb()) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
