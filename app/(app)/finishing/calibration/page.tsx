import { CalibrationView } from "@/components/calibration/calibration-view";
import { FinishingTabs } from "@/components/finishing/finishing-tabs";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Shrinkage calibration" };

export default async function CalibrationPage({ searchParams }: { searchParams: Promise<{ material?: string }> }) {
  const user = await requirePageUser("shop:read");
  const { material } = await searchParams;
  const clock = await loadShopClock(getDb());
  return (
    <>
      <PageHeader
        title="Finishing"
        lead="Every inspection with a green and an as-sintered size tells how much the material really shrank. Here is what it adds up to, per material and axis."
      />
      <FinishingTabs active="calibration" />
      <div className="px-4 md:px-8 py-6">
        <CalibrationView canApply={can(user.role, "calibration:apply")} timeZone={clock.time_zone} initialMaterialId={material && /^[0-9a-f-]{36}$/i.test(material) ? material : undefined} />
      </div>
    </>
  );
}
