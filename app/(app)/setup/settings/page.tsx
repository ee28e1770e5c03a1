import { getDb } from "@/db/client";
import { getShopSettings } from "@/db/settings/reads";
import { PageHeader } from "@/components/ui/page-header";
import { ShopSettingsForm } from "@/components/setup/shop-settings-form";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Shop settings" };

export default async function ShopSettingsPage() {
  await requirePageUser("setup:write");
  const s = await getShopSettings(getDb());
  return (
    <>
      <PageHeader title="Shop settings" lead="Time zone, staffed hours and the margins the planner and the projections use." />
      <div className="px-4 md:px-8 py-6">
        <ShopSettingsForm
          settings={{
            shop_name: s.shop_name, time_zone: s.time_zone, staffed_hours: s.staffed_hours, drying_minutes: s.drying_minutes,
            finishing_lead_minutes: s.finishing_lead_minutes, at_risk_margin_minutes: s.at_risk_margin_minutes,
            plate_clearance_mm: s.plate_clearance_mm, tray_clearance_mm: s.tray_clearance_mm, version: s.version,
          }}
        />
      </div>
    </>
  );
}
