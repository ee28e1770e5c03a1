import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { CertificatePanel } from "@/components/inventory/certificate-panel";
import { LotActions } from "@/components/inventory/lot-actions";
import { kg, STATE_CLASS, STATE_LABEL } from "@/components/inventory/format";
import { PageHeader } from "@/components/ui/page-header";
import { getDb } from "@/db/client";
import { findLotCertificate, findShopZone, getLotOrThrow, lotGenealogy, shopDay } from "@/db/inventory/reads";
import { can } from "@/lib/auth/permissions";
import { AppError } from "@/lib/errors";
import { requirePageUser } from "@/app/_server/session";

export const metadata = { title: "Feedstock lot" };

export default async function LotPage({ params }: { params: Promise<{ id: string }> }) {
  await connection();
  const user = await requirePageUser("shop:read");
  const { id } = await params;
  const db = getDb();
  const lot = await getLotOrThrow(db, id).catch((err) => {
    if (err instanceof AppError && err.status === 404) notFound();
    throw err;
  });
  const [units, certificate, zone] = await Promise.all([lotGenealogy(db, id), findLotCertificate(db, id), findShopZone(db)]);
  const orders = [...new Map(units.map((u) => [u.order_id, u])).values()];
  const builds = [...new Map(units.map((u) => [u.build_id, u])).values()];
  return (
    <>
      <PageHeader
        title={`Lot ${lot.code}`}
        lead={`${lot.material_code} ${lot.material_name} from ${lot.supplier}, their lot ${lot.supplier_lot}.`}
        actions={
          <a href={`/api/inventory/lots/${lot.id}/label`} className="min-h-11 rounded-md border border-clay-300 bg-white px-4 py-2 text-sm font-semibold text-clay-800 hover:bg-clay-50">
            Container label (PDF)
          </a>
        }
      />
      <div className="space-y-5 px-4 py-5 md:px-8 md:py-6">
        <section aria-label="Lot facts" className="grid grid-cols-2 gap-3 rounded-card bg-white p-4 text-sm shadow-card sm:grid-cols-4 md:p-5">
          <div><div className="text-xs text-soot-600">State</div><span className={`mt-1 inline-block rounded px-2 py-0.5 text-xs font-semibold ${STATE_CLASS[lot.state]}`}>{STATE_LABEL[lot.state]}</span>{lot.state_reason ? <div className="mt-1 text-xs text-soot-700">{lot.state_reason}</div> : null}</div>
          <div><div className="text-xs text-soot-600">Left</div><div className="font-semibold tabular-nums">{kg(lot.remaining_g)} of {kg(lot.quantity_g)}</div></div>
          <div><div className="text-xs text-soot-600">Received</div><div>{lot.received_on}</div></div>
          <div><div className="text-xs text-soot-600">Use by</div><div>{lot.expires_on ?? "no shelf life given"}</div></div>
          <div><div className="text-xs text-soot-600">Form</div><div>{lot.form ?? "—"}</div></div>
          <div className="col-span-2"><div className="text-xs text-soot-600">Storage</div><div>{lot.storage_notes || "—"}</div></div>
          <div><div className="text-xs text-soot-600">Certificate of analysis</div><div>{certificate ? <a className="text-clay-800 underline" href={`/api/inventory/lots/${lot.id}/certificate`}>{certificate.filename}</a> : "not attached"}</div></div>
          {lot.recalled_at ? <div className="col-span-2 sm:col-span-4 font-semibold text-oxide-700">Recalled: {lot.recall_reason}</div> : null}
        </section>
        <CertificatePanel
          lot={{ id: lot.id, code: lot.code, version: lot.version }}
          certificate={certificate ? { filename: certificate.filename, content_type: certificate.content_type, size_bytes: certificate.size_bytes, uploaded_at: shopDay(new Date(certificate.created_at), zone) } : null}
          canWrite={can(user.role, "inventory:write")}
        />
        <LotActions lot={lot} canWrite={can(user.role, "inventory:write")} canRecall={can(user.role, "inventory:recall")} />
        <section aria-labelledby="genealogy-heading" className="rounded-card bg-white p-4 shadow-card md:p-5">
          <div className="flex flex-wrap items-baseline justify-between gap-2">
            <h2 id="genealogy-heading" className="font-display text-lg font-semibold">Where it went</h2>
            <a href={`/api/inventory/lots/${lot.id}/genealogy`} className="inline-block min-h-11 py-2 text-sm font-semibold text-clay-800 underline">Download CSV</a>
          </div>
          <p className="text-sm text-soot-700">{builds.length} builds, {units.length} units, {orders.length} orders: {orders.map((o) => `${o.order_code} (${o.customer})`).join(", ") || "none yet"}.</p>
          <div className="mt-3 overflow-x-auto" tabIndex={0} role="region" aria-label="Units made from this lot, scrolls sideways">
            <table className="w-full min-w-[760px] text-sm">
              <thead>
                <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-600">
                  <th className="px-2 py-2">Unit</th><th className="px-2 py-2">State</th><th className="px-2 py-2">Build</th><th className="px-2 py-2">Printer</th>
                  <th className="px-2 py-2">Wash</th><th className="px-2 py-2">Furnace run</th><th className="px-2 py-2">Inspections</th><th className="px-2 py-2">Order</th>
                </tr>
              </thead>
              <tbody>
                {units.map((u) => (
                  <tr key={u.unit_id} className="border-b border-soot-100">
                    <td className="px-2 py-1.5"><Link href={`/units/${u.unit_id}`} className="tap-target inline-flex items-center font-mono text-clay-800 underline-offset-2 hover:underline">{u.serial}</Link></td>
                    <td className="px-2 py-1.5">{u.state.replaceAll("_", " ")}</td>
                    <td className="px-2 py-1.5"><Link href={`/builds/${u.build_id}`} className="tap-target inline-flex items-center text-clay-800 underline-offset-2 hover:underline">{u.build_code}</Link></td>
                    <td className="px-2 py-1.5">{u.printer ?? "—"}</td>
                    <td className="px-2 py-1.5">{u.wash_batch_code ?? "—"}</td>
                    <td className="px-2 py-1.5">{u.furnace_run_code ? `${u.furnace_run_code} (${u.profile_code})` : "—"}</td>
                    <td className="px-2 py-1.5">{u.inspections ? `${u.inspections}, ${u.passed ? "passed" : "failed"}` : "—"}</td>
                    <td className="px-2 py-1.5">{u.order_code} · {u.customer}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      </div>
    </>
  );
}
