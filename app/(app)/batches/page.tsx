import { PageHeader } from "@/components/ui/page-header";
import { BatchesBoard } from "@/components/batches/board";
import { Cautions } from "@/components/safety/cautions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Batches" };

export default async function BatchesPage() {
  const user = await requirePageUser("shop:read");
  return (
    <>
      <PageHeader
        title="Batches"
        lead="Fill wash batches with green units and furnace runs with brown ones. Drag a unit onto a batch or run; one that breaks a rule is refused before it lands."
      />
      <div className="space-y-4 px-4 md:px-8 py-6">
        <Cautions topic="both" folded />
        <BatchesBoard role={user.role} unitPref={user.unit_pref} />
      </div>
    </>
  );
}
