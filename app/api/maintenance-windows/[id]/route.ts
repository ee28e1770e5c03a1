import { NextResponse } from "next/server";
import { z } from "zod";
import { getDb } from "@/db/client";
import { deleteMaintenanceWindow } from "@/db/equipment/commands";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";

// DELETE /api/maintenance-windows/[id] – remove a maintenance window (admin)
export async function DELETE(_req: Request, ctx: { params: Promise<{ id: string }> }) {
  try {
    await requireUser("setup:write");
    const id = z.string().uuid("Not a maintenance window id").parse((await ctx.params).id);
    const row = await deleteMaintenanceWindow(getDb(), id);
    if (!row) throw new AppError("not_found", "That maintenance window does not exist (any more).");
    return NextResponse.json({ ok: true });
  } catch (err) {
    return toErrorResponse(err);
  }
}
