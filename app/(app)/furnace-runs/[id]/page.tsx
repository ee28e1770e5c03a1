import Link from "next/link";
import { notFound } from "next/navigation";
import { PageHeader } from "@/components/ui/page-header";
import { RunView } from "@/components/furnace/run-view";
import { CautionsAroundWork } from "@/components/safety/cautions";
import { getDb } from "@/db/client";
import { findRunCode } from "@/db/furnace-runs/reads";
import { requirePageUser } from "@/app/_server/session";
import { can } from "@/lib/auth/permissions";

export const metadata = { title: "Furnace run" };

export default async function FurnaceRunPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) notFound();
  const code = await findRunCode(getDb(), id);
  if (!code) notFound();
  return (
    <>
      <PageHeader
        title={`Furnace run ${code}`}
        lead="The profile's temperature curve, the trays as loaded, the loading checklist, and the unload."
        leadFromTablet
        actions={
          <>
          {can(user.role, "furnace:write") ? (
            <Link href={`/scan?run=${id}`} className="inline-flex min-h-11 items-center rounded-md bg-clay-600 px-3 text-sm font-semibold text-white hover:bg-clay-700">
              Load by scanning
            </Link>
          ) : null}
          <a href={`/api/furnace-runs/${id}/sheet`} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center rounded-md border border-soot-300 bg-white px-3 text-sm text-soot-800 hover:bg-soot-50" data-testid="run-sheet-link">
            Run sheet (PDF)
          </a>
          <a href={`/api/furnace-runs/${id}/labels`} target="_blank" rel="noreferrer" className="inline-flex min-h-11 items-center rounded-md border border-soot-300 bg-white px-3 text-sm text-soot-800 hover:bg-soot-50" data-testid="unit-labels-link">
            Unit labels (PDF)
          </a>
          <Link href="/batches" className="inline-flex min-h-11 items-center rounded-md border border-soot-200 bg-white px-3 text-sm text-soot-700 hover:bg-soot-50">
            Back to the board
          </Link>
          </>
        }
      />
      <div className="px-4 md:px-8 py-6">
        <CautionsAroundWork topic="furnace">
          <RunView runId={id} role={user.role} unitPref={user.unit_pref} />
        </CautionsAroundWork>
      </div>
    </>
  );
}
