import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { updateMaterial } from "@/db/materials/commands";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { updateMaterialSchema } from "@/lib/setup/schemas";

// PATCH /api/materials/[id] – change a material; builds already printed keep their factors (admin)
export async function PATCH(req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("setup:write");
    const id = z.string().uuid("Not a material id").parse((await ctx.params).id);
    const { version, ...input } = updateMaterialSchema.parse(await readJson(req));
    return NextResponse.json({ material: await updateMaterial(getDb(), id, version, input, user.id) });
  } catch (err) {
    return toErrorResponse(err);
  }
}
