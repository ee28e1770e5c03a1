import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { pathId } from "@/db/batches/reads";
import { getProfileOrThrow } from "@/db/sinter-profiles/reads";
import { updateProfile } from "@/db/sinter-profiles/commands";
import { requireUser } from "@/app/_server/session";
import { updateProfileSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/sinter-profiles/[id] – one profile revision (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("shop:read");
    const id = pathId((await params).id, "sinter profile");
    return NextResponse.json(await getProfileOrThrow(getDb(), id));
  } catch (err) {
    return toErrorResponse(err);
  }
}

// PUT /api/sinter-profiles/[id] – save a profile; one held by a booked run becomes a new revision instead (admin)
export async function PUT(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("setup:write");
    const id = pathId((await params).id, "sinter profile");
    const input = updateProfileSchema.parse(await readJson(req));
    const db = getDb();
    const saved = await db.transaction().execute((trx) => updateProfile(trx, id, input, user.id));
    return NextResponse.json({ ...(await getProfileOrThrow(db, saved.id)), revised: saved.revised }, { status: saved.revised ? 201 : 200 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
