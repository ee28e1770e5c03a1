"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import Link from "next/link";
import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useState } from "react";
import { apiJson } from "@/components/floor/api";
import { GeometryUpload } from "./geometry-upload";
import { MeshPreview } from "./mesh-preview";
import { PartForm, type MaterialChoice, type OrderChoice } from "./part-form";
import { Dialog } from "./field";

type Axis = { axis: "x" | "y" | "z"; nominal_mm: number; with_stock_mm: number; factor: number; green_mm: number };
type Analysis = {
  format: string; triangles: number; bounds: { size: { x: number; y: number; z: number } }; surface_area_mm2: number; volume_mm3: number;
  closed: boolean; closed_reason: string; unit_assumption: string; analysed_ms: number;
};
type Detail = {
  part: Record<string, unknown> & {
    id: string; order_id: string; order_code: string; customer: string; due_at: string; part_number: string; revision: string; name: string; material_code: string; material_name: string;
    quantity: number; version: number; thickest_wall_mm: number; finishing_notes: string; target_ra_um: number | null; tolerance_um: number | null; tolerance_grade: string | null; volume_mm3: number | null;
    stock_x_neg_mm: number; stock_x_pos_mm: number; stock_y_neg_mm: number; stock_y_pos_mm: number; stock_z_neg_mm: number; stock_z_pos_mm: number;
  };
  scale: { shrink_xy: number; shrink_z: number; axes: Axis[]; green_volume_mm3: number | null; masses: { green_g: number; brown_g: number; sintered_g: number; removed_binder_g: number } | null; mass_error: string | null; wash_loss_fraction: number };
  fits: { printer_id: string; printer_name: string; compatible: boolean; build_volume: { x: number; y: number; z: number }; fits: boolean; rotated: boolean; failing: { axis: string; over_mm: number }[] }[];
  clearance_mm: number;
  geometry: { id: string; filename: string; status: string; analysis: Analysis | null; error: string | null; size_bytes: number } | null;
  units: { id: string; serial: string; state: string; build_id: string | null }[];
};

export type PartDetailViewProps = { partId: string; maxBytes: number; canEdit: boolean; canUpload: boolean; materials: MaterialChoice[]; orders: OrderChoice[] };

const f = (x: number, d = 2) => x.toLocaleString(undefined, { minimumFractionDigits: d, maximumFractionDigits: d });
const cm3 = (mm3: number) => `${f(mm3 / 1000, 2)} cm³`;

export function PartDetailView({ partId, maxBytes, canEdit, canUpload, materials, orders }: PartDetailViewProps) {
  const qc = useQueryClient();
  const [editing, setEditing] = useState(false);
  const q = useQuery({ queryKey: ["part", partId], queryFn: ({ signal }) => apiJson<Detail>(`/api/parts/${partId}`, { signal }) });
  const onAnalysed = useCallback(() => void qc.invalidateQueries({ queryKey: ["part", partId] }), [qc, partId]);

  if (q.isLoading) return <p className="px-4 md:px-8 py-6 text-sm text-soot-500">Loading…</p>;
  if (q.isError || !q.data) return <p role="alert" className="px-4 md:px-8 py-6 text-sm text-oxide-700">{(q.error as Error)?.message ?? "Not found"}</p>;
  const { part, scale, fits, geometry } = q.data;
  const a = geometry?.analysis ?? null;
  const stockOf = (axis: "x" | "y" | "z") => [part[`stock_${axis}_neg_mm`] as number, part[`stock_${axis}_pos_mm`] as number];
  const compatible = fits.filter((p) => p.compatible);
  const other = fits.filter((p) => !p.compatible);
  const growth = Object.fromEntries(scale.axes.map((x) => [x.axis, x.green_mm / x.nominal_mm])) as { x: number; y: number; z: number };

  return (
    <div className="grid grid-cols-1 gap-5 px-4 md:px-8 py-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
      <section className="space-y-4">
        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <div className="flex items-start justify-between gap-3">
            <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
              <dt className="text-soot-500">Order</dt>
              <dd>{part.order_code} · {part.customer} · due {new Date(part.due_at).toLocaleDateString()}</dd>
              <dt className="text-soot-500">Material</dt>
              <dd>{part.material_code} · {part.material_name}</dd>
              <dt className="text-soot-500">Quantity</dt>
              <dd className="tabular">{part.quantity} unit{part.quantity === 1 ? "" : "s"}</dd>
              <dt className="text-soot-500">Thickest wall</dt>
              <dd className="tabular">{f(part.thickest_wall_mm, 1)} mm</dd>
              <dt className="text-soot-500">Finishing</dt>
              <dd>
                {part.target_ra_um ? `Ra ${part.target_ra_um} µm` : "no Ra target"}
                {part.tolerance_grade ? ` · ${part.tolerance_grade}` : part.tolerance_um ? ` · ±${part.tolerance_um} µm` : ""}
                {part.finishing_notes ? <span className="block text-xs text-soot-600">{part.finishing_notes}</span> : null}
              </dd>
            </dl>
            {canEdit ? <button type="button" onClick={() => setEditing(true)} className="rounded-md border border-soot-300 px-3 py-1.5 text-sm font-semibold text-soot-800 hover:bg-soot-100">Edit part</button> : null}
          </div>
        </div>

        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card" data-testid="scale-up-panel">
          <h2 className="font-display text-base font-semibold text-soot-900">Scale-up</h2>
          <p className="mb-2 text-xs text-soot-500">
            Green = (finished + stock on both faces) × f, with f = 1/(1 − s): s = {f(scale.shrink_xy * 100, 2)} % in X and Y, {f(scale.shrink_z * 100, 2)} % in Z for {part.material_code}.
          </p>
          <ScrollRegion label="Scale-up per axis"><table className="w-full text-right text-sm tabular">
            <thead className="text-xs text-soot-500">
              <tr><th className="text-left">Axis</th><th>Finished</th><th>Stock (− / +)</th><th>With stock</th><th>Factor</th><th>Green</th></tr>
            </thead>
            <tbody>
              {scale.axes.map((x) => {
                const [neg, pos] = stockOf(x.axis);
                return (
                  <tr key={x.axis} className="border-t border-soot-100" data-axis={x.axis}>
                    <td className="py-1 text-left font-semibold uppercase">{x.axis}</td>
                    <td>{f(x.nominal_mm)} mm</td>
                    <td className="text-soot-600">{f(neg)} / {f(pos)}</td>
                    <td>{f(x.with_stock_mm)} mm</td>
                    <td className="text-soot-600">× {f(x.factor, 4)}</td>
                    <td className="font-semibold text-clay-800" data-testid={`green-${x.axis}`}>{f(x.green_mm)} mm</td>
                  </tr>
                );
              })}
            </tbody>
          </table></ScrollRegion>
          <dl className="mt-3 grid grid-cols-2 gap-x-4 gap-y-1 text-sm">
            <dt className="text-soot-500">Finished volume</dt>
            <dd className="tabular" data-testid="finished-volume">{part.volume_mm3 ? cm3(part.volume_mm3) : "upload the STL to measure it"}</dd>
            <dt className="text-soot-500">Green volume</dt>
            <dd className="tabular">{scale.green_volume_mm3 ? cm3(scale.green_volume_mm3) : "–"}</dd>
            {scale.masses ? (
              <>
                <dt className="text-soot-500">Green mass (printed)</dt>
                <dd className="tabular">{f(scale.masses.green_g, 1)} g</dd>
                <dt className="text-soot-500">Brown mass (after wash)</dt>
                <dd className="tabular">{f(scale.masses.brown_g, 1)} g <span className="text-2xs text-soot-500">at the material&apos;s minimum loss, {f(scale.wash_loss_fraction * 100, 1)} %</span></dd>
                <dt className="text-soot-500">Sintered mass</dt>
                <dd className="tabular">{f(scale.masses.sintered_g, 1)} g</dd>
              </>
            ) : scale.mass_error ? (
              <p className="col-span-2 text-xs text-oxide-700">{scale.mass_error}</p>
            ) : null}
          </dl>
          <h3 className="mt-4 text-sm font-semibold text-soot-800">Fits the printer?</h3>
          <p className="text-2xs text-soot-500">{f(q.data.clearance_mm, 1)} mm clearance kept on each side and above; a quarter turn on the plate is allowed.</p>
          <ul className="mt-1 space-y-1 text-sm" data-testid="printer-fits">
            {compatible.map((p) => (
              <li key={p.printer_id} className="flex flex-wrap items-baseline gap-2">
                <span className={`rounded-full px-2 py-0.5 text-2xs font-semibold uppercase ${p.fits ? "bg-verdigris-100 text-verdigris-700" : "bg-oxide-100 text-oxide-700"}`}>{p.fits ? "fits" : "too big"}</span>
                <span className="font-medium">{p.printer_name}</span>
                <span className="text-xs text-soot-500">{p.build_volume.x} × {p.build_volume.y} × {p.build_volume.z} mm{p.rotated ? ", turned 90°" : ""}</span>
                {!p.fits ? <span className="text-xs text-oxide-700">{p.failing.map((x) => `${x.axis.toUpperCase()} over by ${f(x.over_mm, 1)} mm`).join(", ")}</span> : null}
              </li>
            ))}
            {compatible.length === 0 ? <li className="text-sm text-oxide-700">No printer is set up for {part.material_code}.</li> : null}
            {other.length ? <li className="text-2xs text-soot-500">Not set up for {part.material_code}: {other.map((p) => p.printer_name).join(", ")}</li> : null}
          </ul>
        </div>

        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card">
          <h2 className="font-display text-base font-semibold text-soot-900">Units</h2>
          <ul className="mt-2 grid grid-cols-2 gap-1 text-xs">
            {q.data.units.map((u) => (
              <li key={u.id} className="flex justify-between gap-2 rounded bg-soot-50 px-2 py-1">
                <span className="font-mono font-semibold">{u.serial}</span>
                <span className="text-soot-600">{u.state.replaceAll("_", " ")}{u.build_id ? <> · <Link className="text-clay-700 underline" href={`/builds/${u.build_id}`}>build</Link></> : null}</span>
              </li>
            ))}
          </ul>
        </div>
      </section>

      <section className="space-y-4">
        <div className="rounded-card border border-soot-200 bg-white p-4 shadow-card" data-testid="geometry-panel">
          <h2 className="mb-2 font-display text-base font-semibold text-soot-900">Geometry</h2>
          {canUpload ? <GeometryUpload partId={part.id} maxBytes={maxBytes} current={geometry ? { id: geometry.id, status: geometry.status } : null} onAnalysed={onAnalysed} /> : null}
          {geometry ? (
            <div className="mt-3 space-y-3">
              <p className="text-xs text-soot-600">
                {geometry.filename} · {(geometry.size_bytes / 1024).toFixed(0)} KB · <span data-testid="geometry-status" data-status={geometry.status}>{geometry.status}</span>
                {geometry.error ? <span className="block font-semibold text-oxide-700">{geometry.error}</span> : null}
              </p>
              {a ? (
                <>
                  <dl className="grid grid-cols-2 gap-x-4 gap-y-1 text-sm" data-testid="analysis">
                    <dt className="text-soot-500">Volume</dt>
                    <dd className="tabular font-semibold" data-testid="mesh-volume">{cm3(a.volume_mm3)}</dd>
                    <dt className="text-soot-500">Bounding box</dt>
                    <dd className="tabular">{f(a.bounds.size.x)} × {f(a.bounds.size.y)} × {f(a.bounds.size.z)} mm</dd>
                    <dt className="text-soot-500">Surface area</dt>
                    <dd className="tabular">{f(a.surface_area_mm2 / 100, 1)} cm²</dd>
                    <dt className="text-soot-500">Triangles</dt>
                    <dd className="tabular">{a.triangles.toLocaleString()} ({a.format})</dd>
                    <dt className="text-soot-500">Closed mesh</dt>
                    <dd className={a.closed ? "text-verdigris-700" : "font-semibold text-oxide-700"} data-testid="closed-verdict">{a.closed ? "yes" : "no"}: {a.closed_reason}</dd>
                  </dl>
                  {Math.abs(a.bounds.size.x - (part.nominal_x_mm as number)) > 0.5 || Math.abs(a.bounds.size.y - (part.nominal_y_mm as number)) > 0.5 || Math.abs(a.bounds.size.z - (part.nominal_z_mm as number)) > 0.5 ? (
                    <p className="rounded-md bg-brass-100 px-3 py-2 text-xs text-brass-600">The mesh&apos;s bounding box differs from the part&apos;s finished size; check the drawing or the model&apos;s orientation.</p>
                  ) : null}
                  <p className="text-2xs text-soot-500">{a.unit_assumption}.</p>
                  <MeshPreview
                    fileId={geometry.id}
                    scale={growth}
                    finishedLabel={`Finished ${f(a.bounds.size.x, 1)} × ${f(a.bounds.size.y, 1)} × ${f(a.bounds.size.z, 1)} mm`}
                    greenLabel={`Green ${f(a.bounds.size.x * growth.x, 1)} × ${f(a.bounds.size.y * growth.y, 1)} × ${f(a.bounds.size.z * growth.z, 1)} mm`}
                  />
                </>
              ) : null}
            </div>
          ) : (
            <p className="mt-2 text-sm text-soot-500">No geometry yet.</p>
          )}
        </div>
      </section>

      {editing ? (
        <Dialog title={`Edit ${part.part_number}`} onClose={() => setEditing(false)} wide>
          <PartForm
            materials={materials}
            orders={orders}
            part={part}
            onSaved={async () => {
              setEditing(false);
              await qc.invalidateQueries({ queryKey: ["part", partId] });
            }}
          />
        </Dialog>
      ) : null}
    </div>
  );
}
