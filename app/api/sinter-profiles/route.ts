import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { createProfile } from "@/db/sinter-profiles/commands";
import { getProfileOrThrow, listMaterialsAndFurnaces, listProfilesForSetup } from "@/db/sinter-profiles/reads";
import { requireUser } from "@/app/_server/session";
import { createProfileSchema } from "@/lib/batches/schemas";
import { readJson, toErrorResponse } from "@/app/_server/errors";

// GET /api/sinter-profiles – every profile revision with its segments, materials, furnaces and use (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    const db = getDb();
    const [profiles, refs] = await Promise.all([listProfilesForSetup(db), listMaterialsAndFurnaces(db)]);
    return NextResponse.json({ profiles, ...refs });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/sinter-profiles – create a profile (admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("setup:write");
    const input = createProfileSchema.parse(await readJson(req));
    const db = getDb();
    const id = await db.transaction().execute((trx) => createProfile(trx, input, user.id));
    return NextResponse.json(await getProfileOrThrow(db, id), { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
