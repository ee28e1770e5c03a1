import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { applyFinishingAction } from "@/db/finishing/commands";
import { getFinishingCard } from "@/db/finishing/reads";
import { listInspectionsForUnit } from "@/db/inspections/reads";
import { requireUser } from "@/app/_server/session";
import { finishingActionSchema } from "@/lib/finishing/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

type Ctx = { params: Promise<{ id: string }> };

// GET /api/finishing/[id] – one unit's finishing card with its inspections (every role)
export async function GET(_req: Request, { params }: Ctx) {
  try {
    await requireUser("shop:read");
    const { id } = await params;
    const db = getDb();
    const card = await getFinishingCard(db, id);
    return NextResponse.json({ unit: card, inspections: await listInspectionsForUnit(db, id) }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/finishing/[id] – accept, finish, scrap (failed inspection), hold or release a unit, at the version seen (machinist, admin)
export async function POST(req: Request, { params }: Ctx) {
  try {
    const user = await requireUser("finishing:write");
    const { id } = await params;
    const input = finishingActionSchema.parse(await readJson(req));
    return NextResponse.json({ unit: await applyFinishingAction(getDb(), id, input, user.id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
