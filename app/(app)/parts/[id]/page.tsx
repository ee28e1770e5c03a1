import { notFound } from "next/navigation";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listOrderOptions } from "@/db/orders/reads";
import { getPartOrThrow, listMaterialOptions } from "@/db/parts/reads";
import { QueryProvider } from "@/components/floor/query-provider";
import { PartDetailView } from "@/components/parts/part-detail";
import { PageHeader } from "@/components/ui/page-header";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";

export const metadata = { title: "Part" };

export default async function PartPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  await connection();
  const { id } = await params;
  if (!/^[0-9a-f-]{36}$/i.test(id)) notFound();
  const db = getDb();
  const part = await getPartOrThrow(db, id).catch(() => null);
  if (!part) notFound();
  const [materials, orders] = await Promise.all([listMaterialOptions(db), listOrderOptions(db)]);
  return (
    <>
      <PageHeader title={`${part.part_number} rev ${part.revision}`} lead={`${part.name}: scale-up, geometry and fit on each printer.`} />
      <QueryProvider>
        <PartDetailView
          partId={part.id}
          maxBytes={getEnv().UPLOAD_MAX_BYTES}
          canEdit={can(user.role, "parts:write")}
          canUpload={can(user.role, "geometry:upload")}
          materials={materials.map((m) => ({ id: m.id, code: m.code, name: m.name, shrink_xy: m.shrink_xy, shrink_z: m.shrink_z, active: m.active }))}
          orders={orders.map((o) => ({ id: o.id, code: o.code, customer: o.customer }))}
        />
      </QueryProvider>
    </>
  );
}
