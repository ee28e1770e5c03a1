import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { listLaneBookings } from "@/db/batches/reads";
import { withBatchTransaction } from "@/db/batches/commands";
import { createFurnaceRun } from "@/db/furnace-runs/commands";
import { requireUser } from "@/app/_server/session";
import { createFurnaceRunSchema } from "@/lib/batches/schemas";
import { windowSchema } from "@/lib/batches/window";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/furnace-runs?from&to – booked furnace runs touching a window, for the furnace lanes (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const url = new URL(req.url);
    const w = windowSchema.parse({ from: url.searchParams.get("from") ?? undefined, to: url.searchParams.get("to") ?? undefined });
    const rows = await listLaneBookings(getDb(), "furnace", new Date(w.from), new Date(w.to));
    return NextResponse.json({ furnace_runs: rows });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/furnace-runs – open an empty draft run on a furnace with one sinter profile (furnace operator, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("furnace:write");
    const input = createFurnaceRunSchema.parse(await readJson(req));
    const run = await withBatchTransaction(getDb(), (trx, ctx) => createFurnaceRun(trx, ctx, input, user.id));
    return NextResponse.json(run, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
