import Link from "next/link";
import { notFound } from "next/navigation";
import { PageHeader } from "@/components/ui/page-header";
import { WashView } from "@/components/batches/wash-view";
import { CautionsAroundWork } from "@/components/safety/cautions";
import { getDb } from "@/db/client";
import { findWashCode } from "@/db/wash-batches/reads";
import { findShopTimeZone } from "@/db/batches/reads";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Wash batch" };

export default async function WashBatchPage({ params }: { params: Promise<{ id: string }> }) {
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  if (!/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(id)) notFound();
  const db = getDb();
  const [code, timeZone] = await Promise.all([findWashCode(db, id), findShopTimeZone(db)]);
  if (!code) notFound();
  return (
    <>
      <PageHeader
        title={`Wash batch ${code}`}
        lead="Solvent debinding: the basket, its wash time (set by the slowest unit), and each unit's green and brown weighing."
        leadFromTablet
        actions={
          <Link href="/batches" className="inline-flex min-h-11 items-center rounded-md border border-soot-200 bg-white px-3 text-sm text-soot-700 hover:bg-soot-50">
            Back to the board
          </Link>
        }
      />
      <div className="px-4 md:px-8 py-6">
        <CautionsAroundWork topic="wash">
          <WashView batchId={id} role={user.role} timeZone={timeZone} />
        </CautionsAroundWork>
      </div>
    </>
  );
}
