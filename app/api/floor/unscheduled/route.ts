import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { verdictsForBuilds } from "@/db/builds/reads";
import { listUnscheduledBuilds } from "@/db/floor/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import type { UnscheduledBuild } from "@/lib/floor/schemas";

// GET /api/floor/unscheduled – draft builds with every printer's verdict and print time (every role)
export async function GET() {
  try {
    await requireUser("shop:read");
    const db = getDb();
    const drafts = await listUnscheduledBuilds(db);
    const { verdicts } = await verdictsForBuilds(db, drafts);
    const builds: UnscheduledBuild[] = drafts.map((b) => {
      const v = verdicts.get(b.id);
      return {
        id: b.id, code: b.code, version: b.version, material_id: b.material_id, material_code: b.material_code,
        unit_count: v?.unit_count ?? 0, due_at: b.due_at ? new Date(b.due_at).toISOString() : null,
        printers: (v?.verdicts ?? []).map((p) => ({ printer_id: p.printer_id, ok: p.ok, est_minutes: p.est_minutes, reason: p.reason })),
      };
    });
    return NextResponse.json({ builds }, { headers: { "cache-control": "no-store" } });
  } catch (err) {
    return toErrorResponse(err);
  }
}
