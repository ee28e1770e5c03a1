import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listLaneBookings } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { createWashBatch } from "@/db/wash-batches/commands";
import { requireUser } from "@/app/_server/session";
import { createWashBatchSchema } from "@/lib/batches/schemas";
import { windowSchema } from "@/lib/batches/window";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/wash-batches?from&to – booked wash batches touching a window, for the wash-station lanes (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const url = new URL(req.url);
    const w = windowSchema.parse({ from: url.searchParams.get("from") ?? undefined, to: url.searchParams.get("to") ?? undefined });
    const rows = await listLaneBookings(getDb(), "wash", new Date(w.from), new Date(w.to));
    return NextResponse.json({ wash_batches: rows });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/wash-batches – open an empty draft wash batch on a station (technician, furnace operator, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("wash:write");
    const input = createWashBatchSchema.parse(await readJson(req));
    const batch = await withBatchTransaction(getDb(), (trx, ctx) => createWashBatch(trx, ctx, input, user.id));
    return NextResponse.json(batch, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
