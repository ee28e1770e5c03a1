import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertBuild } from "@/db/builds/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { createBuildSchema } from "@/lib/builds/schemas";

// POST /api/builds – group planned units of one material into a draft build (technician, admin)
export async function POST(req: Request) {
  try {
    const user = await requireUser("builds:write");
    const input = createBuildSchema.parse(await readJson(req));
    const build = await getDb().transaction().execute((trx) => insertBuild(trx, input, user.id));
    return NextResponse.json({ build }, { status: 201 });
  } catch (err) {
    return toErrorResponse(err);
  }
}
