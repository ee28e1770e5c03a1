import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { proposeBatches } from "@/db/batches/commands";
import { requireUser } from "@/app/_server/session";
import { suggestSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// POST /api/batches/suggest – propose wash batches and furnace runs for the waiting units; books nothing (technician, furnace operator, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("wash:write");
    const input = suggestSchema.parse(await readJson(req));
    return NextResponse.json(await proposeBatches(getDb(), input, user.id), { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
