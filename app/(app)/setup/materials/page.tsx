import { getDb } from "@/db/client";
import { listMaterials, listProfileChoices } from "@/db/materials/reads";
import { PageHeader } from "@/components/ui/page-header";
import { MaterialTable } from "@/components/setup/material-table";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Materials" };

export default async function MaterialsPage() {
  await requirePageUser("setup:write");
  const db = getDb();
  const [materials, profiles] = await Promise.all([listMaterials(db), listProfileChoices(db)]);
  return (
    <>
      <PageHeader
        title="Materials"
        lead="Shrinkage per axis, densities and wash constants. A change applies to new scale-ups; builds already printed keep the factors they were printed with."
      />
      <div className="px-4 md:px-8 py-6">
        <MaterialTable materials={materials} profiles={profiles} />
      </div>
    </>
  );
}
