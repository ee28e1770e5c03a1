import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { insertMaintenanceWindow } from "@/db/equipment/commands";
import { listMaintenanceWindows } from "@/db/equipment/reads";
import { requireUser } from "@/app/_server/session";
import { readJson, toErrorResponse } from "@/app/_server/errors";
import { maintenanceWindowQuerySchema, maintenanceWindowSchema } from "@/lib/setup/schemas";

// GET /api/maintenance-windows?from&to – maintenance windows overlapping a time window (every role)
export async function GET(req: Request) {
  try {
    await requireUser("shop:read");
    const q = maintenanceWindowQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
    return NextResponse.json({ maintenance_windows: await listMaintenanceWindows(getDb(), q.from, q.to) });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/maintenance-windows – block a printer, wash station or furnace for maintenance (admin)
export async function POST(req: Request) {
  try {
    await requireUser("setup:write");
    const input = maintenanceWindowSchema.parse(await readJson(req));
    try {
      return NextResponse.json({ maintenance_window: await insertMaintenanceWindow(getDb(), input) }, { status: 201 });
    } catch (err) {
      if ((err as { code?: string }).code === "23503") {
        return NextResponse.json({ error: { code: "invalid", message: "That equipment does not exist.", fieldErrors: { resource_id: ["That equipment does not exist."] } } }, { status: 422 });
      }
      throw err;
    }
  } catch (err) {
    return toErrorResponse(err);
  }
}
