"use client";

import Link from "next/link";
import { useRouter } from "next/navigation";
import { useQueryClient } from "@tanstack/react-query";
import { createColumnHelper, type ColumnDef } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { UNIT_STATES } from "@/lib/parts/schemas";
import { apiJson } from "@/components/floor/api";
import { ServerTable } from "./server-table";
import { ProjectionBadge } from "./projection-badge";
import { OrderForm } from "./order-form";
import { PartForm, type MaterialChoice, type OrderChoice } from "./part-form";
import { CsvImport } from "./csv-import";
import { Dialog, inputClass } from "./field";

type Projection = { status: string; projected_end: string | null; slack_minutes: number | null } | null;
type OrderRow = { id: string; code: string; customer: string; project: string; due_at: string; priority: number; notes: string; version: number; part_count: number; unit_count: number; done_count: number; projection: Projection };
type PartRow = {
  id: string; part_number: string; revision: string; name: string; quantity: number; material_code: string; order_id: string; order_code: string; due_at: string;
  nominal_x_mm: number; nominal_y_mm: number; nominal_z_mm: number; green_x_mm: number | null; green_y_mm: number | null; green_z_mm: number | null;
  geometry_status: string | null; unit_count: number;
};
type UnitRow = {
  id: string; serial: string; state: string; part_id: string; part_number: string; part_name: string; material_id: string; material_code: string; order_code: string; due_at: string;
  build_id: string | null; build_code: string | null; build_state: string | null; hold_reason: string | null; scrap_reason: string | null; projection: Projection;
};

export type PartsWorkspaceProps = {
  materials: MaterialChoice[];
  orders: OrderChoice[];
  canWriteOrders: boolean;
  canWriteParts: boolean;
  canPrioritize: boolean;
  canBuild: boolean;
};

const day = (iso: string) => new Date(iso).toLocaleDateString(undefined, { day: "numeric", month: "short", year: "numeric" });
const mm = (x: number | null) => (x === null ? "–" : x.toFixed(x >= 100 ? 0 : 1));
const STATE_LABEL = (s: string) => s.replaceAll("_", " ");

export function PartsWorkspace({ materials, orders, canWriteOrders, canWriteParts, canPrioritize, canBuild }: PartsWorkspaceProps) {
  const qc = useQueryClient();
  const router = useRouter();
  const [tab, setTab] = useState<"orders" | "parts" | "units">("orders");
  const [dialog, setDialog] = useState<null | { kind: "order"; order?: OrderRow } | { kind: "part" } | { kind: "import" }>(null);
  const [orderFilter, setOrderFilter] = useState<{ id: string; code: string } | null>(null);
  const [materialFilter, setMaterialFilter] = useState("");
  const [stateFilter, setStateFilter] = useState("");
  const [unbuilt, setUnbuilt] = useState(false);
  const [selected, setSelected] = useState<UnitRow[]>([]);
  const [notice, setNotice] = useState<{ tone: "success" | "danger"; text: string } | null>(null);
  const [orderChoices, setOrderChoices] = useState(orders);

  const refresh = async () => {
    await Promise.all(["orders", "parts", "units"].map((k) => qc.invalidateQueries({ queryKey: [k] })));
  };

  const oc = createColumnHelper<OrderRow>();
  const orderColumns = useMemo(
    () =>
      [
        oc.accessor("code", { header: "Work order", cell: (c) => <span className="font-semibold text-soot-900">{c.getValue()}</span> }),
        oc.accessor("customer", { header: "Customer", cell: (c) => <span>{c.getValue()}{c.row.original.project ? <span className="block text-2xs text-soot-500">{c.row.original.project}</span> : null}</span> }),
        oc.accessor("due_at", { header: "Due", cell: (c) => <span className="tabular">{day(c.getValue())}</span> }),
        oc.accessor("priority", { header: "Priority", cell: (c) => <span className="tabular">{c.getValue()}</span> }),
        oc.display({ id: "counts", header: "Parts · units", cell: (c) => <span className="tabular text-soot-600">{c.row.original.part_count} · {c.row.original.done_count}/{c.row.original.unit_count} done</span> }),
        oc.display({ id: "projection", header: "Projected", cell: (c) => <ProjectionBadge projection={c.row.original.projection} /> }),
        oc.display({
          id: "actions",
          header: "",
          cell: (c) => (
            <span className="flex gap-2 whitespace-nowrap text-xs">
              <button type="button" className="text-clay-700 underline" onClick={() => { setOrderFilter({ id: c.row.original.id, code: c.row.original.code }); setTab("parts"); }}>
                Parts
              </button>
              {canWriteOrders ? (
                <button type="button" className="text-clay-700 underline" onClick={() => setDialog({ kind: "order", order: c.row.original })}>
                  Edit
                </button>
              ) : null}
            </span>
          ),
        }),
      ] as ColumnDef<OrderRow, unknown>[],
    [oc, canWriteOrders],
  );

  const pc = createColumnHelper<PartRow>();
  const partColumns = useMemo(
    () =>
      [
        pc.accessor("part_number", { header: "Part", cell: (c) => <Link href={`/parts/${c.row.original.id}`} className="font-semibold text-clay-800 hover:underline">{c.getValue()} <span className="font-normal text-soot-500">rev {c.row.original.revision}</span></Link> }),
        pc.accessor("name", { header: "Name" }),
        pc.accessor("order_code", { header: "Order" }),
        pc.accessor("material_code", { header: "Material" }),
        pc.accessor("quantity", { header: "Qty", cell: (c) => <span className="tabular">{c.getValue()}</span> }),
        pc.display({ id: "size", header: "Finished → green, mm", cell: (c) => { const r = c.row.original; return <span className="tabular text-xs">{mm(r.nominal_x_mm)}×{mm(r.nominal_y_mm)}×{mm(r.nominal_z_mm)} → <span className="text-clay-800">{mm(r.green_x_mm)}×{mm(r.green_y_mm)}×{mm(r.green_z_mm)}</span></span>; } }),
        pc.accessor("geometry_status", { header: "Geometry", enableSorting: false, cell: (c) => <span className="text-xs text-soot-600">{c.getValue() ?? "none"}</span> }),
        pc.accessor("due_at", { header: "Due", cell: (c) => <span className="tabular">{day(c.getValue())}</span> }),
      ] as ColumnDef<PartRow, unknown>[],
    [pc],
  );

  const uc = createColumnHelper<UnitRow>();
  const unitColumns = useMemo(
    () =>
      [
        ...(canBuild
          ? [
              uc.display({
                id: "select",
                header: () => <span className="sr-only">Select</span>,
                cell: (c) =>
                  c.row.getCanSelect() ? (
                    <input type="checkbox" aria-label={`Select ${c.row.original.serial}`} checked={c.row.getIsSelected()} onChange={c.row.getToggleSelectedHandler()} />
                  ) : null,
              }),
            ]
          : []),
        uc.accessor("serial", { header: "Unit", cell: (c) => <span className="font-mono text-xs font-semibold">{c.getValue()}</span> }),
        uc.accessor("state", { header: "State", cell: (c) => <span className="text-xs">{STATE_LABEL(c.getValue())}{c.row.original.hold_reason ? <span className="block text-2xs text-brass-600">{c.row.original.hold_reason}</span> : null}{c.row.original.scrap_reason ? <span className="block text-2xs text-oxide-700">{STATE_LABEL(c.row.original.scrap_reason)}</span> : null}</span> }),
        uc.accessor("part_number", { header: "Part", cell: (c) => <Link href={`/parts/${c.row.original.part_id}`} className="text-clay-800 hover:underline">{c.getValue()}</Link> }),
        uc.accessor("material_code", { header: "Material" }),
        uc.display({ id: "build", header: "Build", cell: (c) => (c.row.original.build_id ? <Link href={`/builds/${c.row.original.build_id}`} className="text-clay-800 hover:underline">{c.row.original.build_code}</Link> : <span className="text-soot-500">–</span>) }),
        uc.accessor("due_at", { header: "Due", cell: (c) => <span className="tabular">{day(c.getValue())}<span className="block text-2xs text-soot-500">{c.row.original.order_code}</span></span> }),
        uc.display({ id: "projection", header: "Projected", cell: (c) => <ProjectionBadge projection={c.row.original.projection} /> }),
      ] as ColumnDef<UnitRow, unknown>[],
    [uc, canBuild],
  );

  async function groupIntoBuild() {
    const materialsSel = new Set(selected.map((u) => u.material_id));
    if (materialsSel.size !== 1) {
      setNotice({ tone: "danger", text: "A build prints one material: choose units of one material." });
      return;
    }
    try {
      const res = await apiJson<{ build: { id: string; code: string } }>("/api/builds", { method: "POST", body: { unit_ids: selected.map((u) => u.id) } });
      router.push(`/builds/${res.build.id}`);
    } catch (err) {
      setNotice({ tone: "danger", text: (err as Error).message });
    }
  }

  const tabs: Array<[typeof tab, string]> = [["orders", "Orders"], ["parts", "Parts"], ["units", "Units"]];
  return (
    <div className="space-y-4 px-4 md:px-8 py-6">
      <div className="flex flex-wrap items-center gap-2">
        <div role="tablist" aria-label="Order book" className="flex rounded-md border border-soot-200 bg-white p-0.5">
          {tabs.map(([id, label]) => (
            <button key={id} role="tab" type="button" aria-selected={tab === id} onClick={() => setTab(id)}
              className={`rounded px-3 py-1.5 text-sm font-semibold ${tab === id ? "bg-soot-800 text-soot-50" : "text-soot-600 hover:bg-soot-100"}`}>
              {label}
            </button>
          ))}
        </div>
        <div className="ml-auto flex gap-2">
          {canWriteOrders ? <button type="button" onClick={() => setDialog({ kind: "order" })} className="rounded-md border border-soot-300 bg-white px-3 py-1.5 text-sm font-semibold text-soot-800 hover:bg-soot-100">New order</button> : null}
          {canWriteParts ? <button type="button" onClick={() => setDialog({ kind: "part" })} className="rounded-md bg-clay-600 px-3 py-1.5 text-sm font-semibold text-white hover:bg-clay-700">New part</button> : null}
          {canWriteParts && canWriteOrders ? <button type="button" onClick={() => setDialog({ kind: "import" })} className="rounded-md border border-clay-500 bg-white px-3 py-1.5 text-sm font-semibold text-clay-700 hover:bg-clay-50">Import CSV</button> : null}
        </div>
      </div>
      {notice ? <div role={notice.tone === "danger" ? "alert" : "status"} data-testid="parts-notice" className={`rounded-card border px-3 py-2 text-sm ${notice.tone === "danger" ? "border-oxide-500/40 bg-oxide-100 text-oxide-700" : "border-verdigris-400/40 bg-verdigris-100 text-verdigris-700"}`}>{notice.text}</div> : null}

      {tab === "orders" ? (
        <ServerTable<OrderRow> exportCsv path="/api/orders" queryKey="orders" columns={orderColumns} defaultSort={{ id: "due_at", desc: false }} searchPlaceholder="Search work order, customer, project" getRowId={(r) => r.id} caption="Orders" testId="orders-table" />
      ) : null}
      {tab === "parts" ? (
        <ServerTable<PartRow>
          exportCsv path="/api/parts" queryKey="parts" columns={partColumns} defaultSort={{ id: "due_at", desc: false }} searchPlaceholder="Search part number, name, order, customer" getRowId={(r) => r.id} caption="Parts" testId="parts-table"
          filters={{ order_id: orderFilter?.id, material_id: materialFilter || undefined }}
          toolbar={
            <>
              <select value={materialFilter} onChange={(e) => setMaterialFilter(e.target.value)} className={`${inputClass} mt-0 w-40`} aria-label="Material">
                <option value="">All materials</option>
                {materials.map((m) => <option key={m.id} value={m.id}>{m.code}</option>)}
              </select>
              {orderFilter ? (
                <button type="button" onClick={() => setOrderFilter(null)} className="rounded-full bg-clay-100 px-2.5 py-1 text-xs font-semibold text-clay-800">
                  Order {orderFilter.code} ✕
                </button>
              ) : null}
            </>
          }
        />
      ) : null}
      {tab === "units" ? (
        <ServerTable<UnitRow>
          exportCsv path="/api/units" queryKey="units" columns={unitColumns} defaultSort={{ id: "due_at", desc: false }} searchPlaceholder="Search serial, part, order" getRowId={(r) => r.id} caption="Units" testId="units-table"
          filters={{ state: stateFilter || undefined, material_id: materialFilter || undefined, unbuilt: unbuilt ? "true" : undefined }}
          selectable={(u) => canBuild && u.state === "planned" && !u.build_id}
          onSelectionChange={setSelected}
          toolbar={
            <>
              <select value={stateFilter} onChange={(e) => setStateFilter(e.target.value)} className={`${inputClass} mt-0 w-44`} aria-label="State">
                <option value="">All states</option>
                {UNIT_STATES.map((s) => <option key={s} value={s}>{STATE_LABEL(s)}</option>)}
              </select>
              <select value={materialFilter} onChange={(e) => setMaterialFilter(e.target.value)} className={`${inputClass} mt-0 w-36`} aria-label="Material">
                <option value="">All materials</option>
                {materials.map((m) => <option key={m.id} value={m.id}>{m.code}</option>)}
              </select>
              <label className="flex items-center gap-1 text-xs text-soot-600">
                <input type="checkbox" checked={unbuilt} onChange={(e) => setUnbuilt(e.target.checked)} /> planned, on no build
              </label>
              {canBuild && selected.length ? (
                <button type="button" onClick={groupIntoBuild} className="rounded-md bg-clay-600 px-3 py-1.5 text-xs font-semibold text-white hover:bg-clay-700" data-testid="group-into-build">
                  Make a build of {selected.length} unit{selected.length === 1 ? "" : "s"}
                </button>
              ) : null}
            </>
          }
        />
      ) : null}

      {dialog?.kind === "order" ? (
        <Dialog title={dialog.order ? `Edit ${dialog.order.code}` : "New order"} onClose={() => setDialog(null)}>
          <OrderForm
            order={dialog.order}
            canPrioritize={canPrioritize}
            onSaved={async (o) => {
              setDialog(null);
              setNotice({ tone: "success", text: `Order ${o.code} saved.` });
              if (!dialog.order) setOrderChoices((list) => [...list, { id: o.id, code: o.code, customer: "" }].sort((a, b) => a.code.localeCompare(b.code)));
              await refresh();
            }}
          />
        </Dialog>
      ) : null}
      {dialog?.kind === "part" ? (
        <Dialog title="New part" onClose={() => setDialog(null)} wide>
          <PartForm materials={materials} orders={orderChoices} defaultOrderId={orderFilter?.id} onSaved={(p) => router.push(`/parts/${p.id}`)} />
        </Dialog>
      ) : null}
      {dialog?.kind === "import" ? (
        <Dialog title="Import orders and parts from CSV" onClose={() => setDialog(null)} wide>
          <CsvImport
            onImported={async (text) => {
              setDialog(null);
              setNotice({ tone: "success", text });
              await refresh();
              router.refresh();
            }}
          />
        </Dialog>
      ) : null}
    </div>
  );
}
