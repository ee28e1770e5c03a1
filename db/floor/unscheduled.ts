// The floor's tray of draft builds with every printer's verdict and print time
// (GET /api/floor/unscheduled): one load per change stamp shared by every open floor, because
// every floor asks again after each build change it hears of.
import type { Database } from "@/db/client";
import { verdictsForBuilds } from "@/db/builds/reads";
import { listUnscheduledBuilds } from "@/db/floor/reads";
import { WindowBody } from "@/lib/floor/window-body";
import { sharedReadCache } from "@/lib/floor/window-cache";
import type { UnscheduledBuild } from "@/lib/floor/schemas";

export async function loadUnscheduledBuilds(db: Database): Promise<{ builds: UnscheduledBuild[] }> {
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
  return { builds };
}

/** The encoded body, from the process-wide cache while the "shop" stamp holds (db/live/stamps.ts). */
export function unscheduledBody(db: Database, stamp: string): Promise<WindowBody> {
  return sharedReadCache().get("unscheduled", stamp, async () => WindowBody.ready(JSON.stringify(await loadUnscheduledBuilds(db))));
}
