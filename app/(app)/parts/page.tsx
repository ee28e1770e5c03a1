import { connection } from "next/server";
import { getDb } from "@/db/client";
import { listOrderOptions } from "@/db/orders/reads";
import { listMaterialOptions } from "@/db/parts/reads";
import { QueryProvider } from "@/components/floor/query-provider";
import { PartsWorkspace } from "@/components/parts/parts-workspace";
import { PageHeader } from "@/components/ui/page-header";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Orders & parts" };

export default async function PartsPage() {
  const user = await requirePageUser("shop:read");
  await connection();
  const db = getDb();
  const [materials, orders] = await Promise.all([listMaterialOptions(db), listOrderOptions(db)]);
  return (
    <>
      <PageHeader
        title="Orders & parts"
        lead="Orders become parts and units; group planned units of one material into a build. Projected completion runs each unit through print, wash, furnace and finishing."
      />
      <QueryProvider>
        <PartsWorkspace
          materials={materials.map((m) => ({ id: m.id, code: m.code, name: m.name, shrink_xy: m.shrink_xy, shrink_z: m.shrink_z, active: m.active }))}
          orders={orders.map((o) => ({ id: o.id, code: o.code, customer: o.customer }))}
          canWriteOrders={can(user.role, "orders:write")}
          canWriteParts={can(user.role, "parts:write")}
          canPrioritize={can(user.role, "orders:prioritize")}
          canBuild={can(user.role, "builds:write")}
        />
      </QueryProvider>
    </>
  );
}
