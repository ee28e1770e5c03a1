import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { quoteLearning } from "@/db/quotes/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/quotes/learning – quotes sent, win rate, and for finished orders promised vs actual completion (manager, admin)
export async function GET() {
  try {
    await requireUser("capacity:read");
    return NextResponse.json(await quoteLearning(getDb()));
  } catch (err) {
    return toErrorResponse(err);
  }
}
