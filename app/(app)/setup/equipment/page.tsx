import { getDb } from "@/db/client";
import { listFurnaces, listMaintenanceWindows, listPrinters, listWashStations } from "@/db/equipment/reads";
import { listMaterials, listProfileChoices } from "@/db/materials/reads";
import { getShopSettings } from "@/db/settings/reads";
import { PageHeader } from "@/components/ui/page-header";
import { EquipmentTables } from "@/components/setup/equipment-tables";
import { MaintenanceWindows } from "@/components/setup/maintenance-windows";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Equipment" };

export default async function EquipmentPage() {
  await requirePageUser("setup:write");
  const db = getDb();
  // eslint-disable-next-line react-hooks/purity -- a server component renders once per request
  const now = Date.now();
  const [printers, washStations, furnaces, materials, profiles, windows, settings] = await Promise.all([
    listPrinters(db), listWashStations(db), listFurnaces(db), listMaterials(db), listProfileChoices(db),
    listMaintenanceWindows(db, new Date(now - 7 * 86_400_000), new Date(now + 120 * 86_400_000)),
    getShopSettings(db),
  ]);
  const resources = [
    ...printers.map((p) => ({ kind: "printer" as const, id: p.id, name: p.name })),
    ...washStations.map((w) => ({ kind: "wash_station" as const, id: w.id, name: w.name })),
    ...furnaces.map((f) => ({ kind: "furnace" as const, id: f.id, name: f.name })),
  ];
  return (
    <>
      <PageHeader title="Equipment" lead="Printers, wash stations and furnaces: sizes, rates and limits the planner relies on, and their maintenance windows." />
      <div className="space-y-6 px-4 md:px-8 py-6">
        <EquipmentTables printers={printers} washStations={washStations} furnaces={furnaces} materials={materials} profiles={profiles} />
        <MaintenanceWindows windows={windows.map((w) => ({ ...w, starts_at: w.starts_at.toISOString(), ends_at: w.ends_at.toISOString() }))} resources={resources} timeZone={settings.time_zone} />
      </div>
    </>
  );
}
