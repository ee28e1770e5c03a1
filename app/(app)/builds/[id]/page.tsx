import { notFound } from "next/navigation";
import { connection } from "next/server";
import { getDb } from "@/db/client";
import { findBuildById } from "@/db/builds/reads";
import { findShopTimeZone } from "@/db/batches/reads";
import { BuildView } from "@/components/builds/build-view";
import { BuildFeedstock } from "@/components/inventory/build-feedstock";
import { estimateBuildDraws, listDrawsForBuild, listLots } from "@/db/inventory/reads";
import { QueryProvider } from "@/components/floor/query-provider";
import { PageHeader } from "@/components/ui/page-header";
import { can } from "@/lib/auth/permissions";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Build" };

export default async function BuildPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  await connection();
  const { id } = await params;
  if (!/^[0-9a-f-]{36}$/i.test(id)) notFound();
  const [build, timeZone] = await Promise.all([findBuildById(getDb(), id), findShopTimeZone(getDb())]);
  if (!build) notFound();
  const db = getDb();
  const [draws, estimates, lots] = await Promise.all([
    listDrawsForBuild(db, build.id),
    estimateBuildDraws(db, { buildIds: [build.id] }),
    listLots(db, { material_id: build.material_id, state: "released" }),
  ]);
  return (
    <>
      <PageHeader title={`Build ${build.code}`} lead="Units of one material on one plate: the layout, the print time on each printer, the material lot and the traveler that goes with it." />
      <QueryProvider>
        <BuildView buildId={build.id} canWrite={can(user.role, "builds:write")} timeZone={timeZone} role={user.role} />
      </QueryProvider>
      <BuildFeedstock
        buildId={build.id}
        state={build.state}
        chosenLotId={build.feedstock_lot_id}
        estimateG={estimates.get(build.id)?.total_g ?? null}
        draws={draws.map((d) => ({ ...d, corrected_at: d.corrected_at ? new Date(d.corrected_at).toISOString() : null }))}
        lots={lots.filter((l) => !l.expires_on || l.expires_on >= new Date().toISOString().slice(0, 10))}
        canWrite={can(user.role, "builds:write")}
      />
    </>
  );
}
