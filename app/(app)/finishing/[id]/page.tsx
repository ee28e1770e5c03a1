import Link from "next/link";
import { DustCaution } from "@/components/finishing/dust-caution";
import { FinishingUnit } from "@/components/finishing/finishing-unit";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Finishing a unit" };

export default async function FinishingUnitPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  const clock = await loadShopClock(getDb());
  return (
    <>
      <PageHeader
        title="Finishing a unit"
        lead="Stock per face, the drawing's tolerance and Ra, and the inspection record."
        actions={<Link href="/finishing" className="inline-flex min-h-11 items-center text-sm font-semibold text-clay-700 hover:underline">Back to the queue</Link>}
      />
      <div className="space-y-5 px-4 md:px-8 py-6">
        <DustCaution />
        <FinishingUnit unitId={id} units={user.unit_pref} timeZone={clock.time_zone} canWrite={can(user.role, "finishing:write")} canInspect={can(user.role, "inspections:write")} />
      </div>
    </>
  );
}
