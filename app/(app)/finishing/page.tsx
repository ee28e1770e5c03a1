import { FinishingQueue } from "@/components/finishing/finishing-queue";
import { DustCaution } from "@/components/finishing/dust-caution";
import { FinishingTabs } from "@/components/finishing/finishing-tabs";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Finishing" };

export default async function FinishingPage() {
  const user = await requirePageUser("shop:read");
  const clock = await loadShopClock(getDb());
  return (
    <>
      <PageHeader
        title="Finishing"
        lead={`What comes out of the furnaces and when, with the stock left on each face. Lengths in ${user.unit_pref === "in" ? "inches" : "millimetres"}; times in ${clock.time_zone.replaceAll("_", " ")}.`}
      />
      <FinishingTabs active="queue" />
      <div className="space-y-5 px-4 md:px-8 py-6">
        <DustCaution />
        <FinishingQueue canWrite={can(user.role, "finishing:write")} units={user.unit_pref} timeZone={clock.time_zone} />
      </div>
    </>
  );
}
