import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadBoard } from "@/db/batches/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";

// GET /api/batches – the batching board: waiting units, open wash batches and furnace runs, equipment (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json(await loadBoard(getDb()));
  } catch (err) {
    return toErrorResponse(err);
  }
}
