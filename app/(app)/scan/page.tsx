import { PageHeader } from "@/components/ui/page-header";
import { LoadRun } from "@/components/scan/load-run";
import { ScanWorkspace } from "@/components/scan/scan-workspace";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Scan" };

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export default async function ScanPage({ searchParams }: { searchParams: Promise<{ run?: string }> }) {
  const user = await requirePageUser("floor:scan");
  const { run } = await searchParams;
  const runId = typeof run === "string" && UUID.test(run) ? run : null;
  return (
    <>
      <PageHeader
        title={runId ? "Load a furnace run" : "Scan"}
        lead={runId ? "Scan each unit's traveler as it goes onto the trays; the tally shows what is still missing." : "Scan a traveler's QR code, or type the code printed on it, to open the unit, build, wash batch or furnace run."}
      />
      <div className="px-4 py-5 md:px-8">{runId ? <LoadRun runId={runId} canLoad={can(user.role, "furnace:write")} /> : <ScanWorkspace />}</div>
    </>
  );
}
