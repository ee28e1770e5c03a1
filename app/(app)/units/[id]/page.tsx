import { UnitTrace } from "@/components/units/unit-trace";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Unit" };

export default async function UnitPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  const clock = await loadShopClock(getDb());
  return (
    <>
      <PageHeader title="Unit history" lead="Material lot, build and printer, wash and masses, furnace run and profile, inspections and every event, in one place." />
      <div className="px-4 md:px-8 py-6">
        <UnitTrace unitId={id} units={user.unit_pref} timeZone={clock.time_zone} canAttach={can(user.role, "inspections:write")} role={user.role} />
      </div>
    </>
  );
}
