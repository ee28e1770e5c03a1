import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadUnitTrace } from "@/db/trace/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/units/[id]/trace – material lot, build, printer, wash batch and masses, furnace run and profile, inspections and every event as one timeline (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const { id } = await params;
    return NextResponse.json(await loadUnitTrace(getDb(), id), { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
