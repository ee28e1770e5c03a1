import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { loadBoard } from "@/db/queries/batches";
import { requireUser } from "@/lib/auth/session";
import { toErrorResponse } from "@/lib/http/errors";

// GET /api/batches – the batching board: waiting units, open wash batches and furnace runs, equipment (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    return NextResponse.json(await loadBoard(getDb()));
  } catch (err) {
    return toErrorResponse(err);
  }
}
