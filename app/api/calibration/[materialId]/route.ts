import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadMaterialCalibration } from "@/db/calibration/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/calibration/[materialId] – realized shrinkage points, mean, spread, count, suggested factors and history (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ materialId: string }> }) {
  try {
    await requireUser("shop:read");
    const { materialId } = await params;
    return NextResponse.json(await loadMaterialCalibration(getDb(), materialId), { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
