import { UnitTrace } from "@/components/units/unit-trace";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { loadShopClock } from "@/db/capacity/reads";
import { loadUnitTrace } from "@/db/trace/reads";
import { can } from "@/lib/auth/permissions";
import type { UnitTrace as Trace } from "@/lib/finishing/types";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Unit" };

export default async function UnitPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  const db = getDb();
  // The page a traveler's QR code opens on a phone: its history comes with the HTML (in the
  // JSON shape of GET /api/units/[id]/trace, which refreshes it), so the next step is on screen
  // without waiting for the page's script and a second round trip. Should it fail here, the
  // page asks the API as before and shows that answer, a missing unit's message included.
  const [clock, initial] = await Promise.all([
    loadShopClock(db),
    loadUnitTrace(db, id).then((t) => JSON.parse(JSON.stringify(t)) as Trace, () => undefined),
  ]);
  return (
    <>
      <PageHeader title="Unit history" lead="Material lot, build and printer, wash and masses, furnace run and profile, inspections and every event, in one place." />
      <div className="px-4 md:px-8 py-6">
        <UnitTrace unitId={id} initial={initial} units={user.unit_pref} timeZone={clock.time_zone} canAttach={can(user.role, "inspections:write")} role={user.role} />
      </div>
    </>
  );
}
