import { connection } from "next/server";
import { ConsumablesView } from "@/components/inventory/consumables-view";
import { LotsTable } from "@/components/inventory/lots-table";
import { ProjectionView } from "@/components/inventory/projection-view";
import { ReceiveForm } from "@/components/inventory/receive-form";
import { SolventGasCaution } from "@/components/inventory/solvent-gas-caution";
import { StockSettings } from "@/components/inventory/stock-settings";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { gasOutlook, listBaths, listForms, listLots, projectStock } from "@/db/inventory/reads";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Feedstock" };

const DAYS = 28;

export default async function InventoryPage() {
  await connection();
  const user = await requirePageUser("shop:read");
  const db = getDb();
  const [outlook, lots, forms, baths, gas] = await Promise.all([projectStock(db, { days: DAYS }), listLots(db), listForms(db), listBaths(db), gasOutlook(db)]);
  return (
    <>
      <PageHeader title="Feedstock" lead={`Lots on the shelf, what scheduled builds will take, and the solvent and gas behind each step. Days in ${outlook.time_zone.replaceAll("_", " ")}.`} />
      <div className="space-y-5 px-4 py-5 md:px-8 md:py-6">
        <ProjectionView materials={outlook.materials} days={DAYS} />
        {can(user.role, "inventory:write") ? <ReceiveForm materials={outlook.materials.map((m) => ({ id: m.id, code: m.code, name: m.name }))} forms={forms} today={outlook.today} /> : null}
        <LotsTable lots={lots} today={outlook.today} />
        <StockSettings
          materials={outlook.materials.map((m) => ({ id: m.id, code: m.code, name: m.name, version: m.version, support_allowance: m.support_allowance, purge_g: m.purge_g, reorder_point_g: m.reorder_point_g, lead_time_days: m.lead_time_days }))}
          forms={forms}
          canWrite={can(user.role, "inventory:write")}
        />
        <SolventGasCaution />
        <ConsumablesView
          baths={baths.map((b) => ({ ...b, bath_changed_at: new Date(b.bath_changed_at).toISOString() }))}
          gas={{ supplies: gas.supplies.map((s) => ({ ...s, counted_at: new Date(s.counted_at).toISOString() })), warnings: gas.warnings }}
          canWrite={can(user.role, "consumables:write")}
          timeZone={outlook.time_zone}
        />
      </div>
    </>
  );
}
