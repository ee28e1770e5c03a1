"use client";

import { RecordTable } from "./record-table";
import type { FieldDef } from "./record-form";

export type MaterialTableProps = { materials: Record<string, unknown>[]; profiles: { id: string; code: string; revision: number }[] };

const pct = (x: unknown) => `${(Number(x) * 100).toFixed(2)} %`;
const factor = (s: unknown) => (1 / (1 - Number(s))).toFixed(4);

export function MaterialTable({ materials, profiles }: MaterialTableProps) {
  const fields: FieldDef[] = [
    { name: "code", label: "Code", type: "text" },
    { name: "name", label: "Name", type: "text" },
    { name: "alloy_family", label: "Alloy family", type: "text" },
    { name: "default_profile_id", label: "Default sinter profile", type: "select", nullable: true, options: profiles.map((p) => ({ value: p.id, label: `${p.code} r${p.revision}` })) },
    { name: "shrink_xy", label: "Linear shrinkage XY", type: "number", hint: "fraction of the green size, e.g. 0.148" },
    { name: "shrink_z", label: "Linear shrinkage Z", type: "number", hint: "along the build direction" },
    { name: "solids_loading", label: "Solids loading φ", type: "number", hint: "powder volume fraction of the feedstock" },
    { name: "green_density_g_cm3", label: "Green density", type: "number", unit: "g/cm³", hint: "printed part, binder included" },
    { name: "sintered_density_g_cm3", label: "Sintered density", type: "number", unit: "g/cm³" },
    { name: "theoretical_density_g_cm3", label: "Wrought density", type: "number", unit: "g/cm³" },
    { name: "binder_density_g_cm3", label: "Binder density", type: "number", unit: "g/cm³" },
    { name: "wash_k_min_per_mm2", label: "Wash constant k", type: "number", unit: "min/mm²", hint: "t = k·h² + minimum" },
    { name: "wash_min_minutes", label: "Minimum wash", type: "number", unit: "min" },
    { name: "min_mass_loss", label: "Minimum wash mass loss", type: "number", hint: "fraction of the green mass, e.g. 0.035" },
    { name: "active", label: "In use", type: "checkbox" },
  ];
  return (
    <RecordTable
      title="Materials"
      noun="material"
      endpoint="/api/materials"
      rows={materials}
      fields={fields}
      blank={{ code: "", name: "", alloy_family: "", default_profile_id: null, shrink_xy: 0.15, shrink_z: 0.165, solids_loading: 0.6, green_density_g_cm3: 5.05, sintered_density_g_cm3: 7.6, theoretical_density_g_cm3: 7.8, binder_density_g_cm3: 0.95, wash_k_min_per_mm2: 30, wash_min_minutes: 60, min_mass_loss: 0.035, active: true }}
      toForm={(r) => Object.fromEntries(fields.map((f) => [f.name, r[f.name]]))}
      columns={[
        { key: "code", label: "Code" },
        { key: "name", label: "Name" },
        { key: "shrink_xy", label: "Shrink XY", align: "right", render: (r) => `${pct(r.shrink_xy)} (×${factor(r.shrink_xy)})` },
        { key: "shrink_z", label: "Shrink Z", align: "right", render: (r) => `${pct(r.shrink_z)} (×${factor(r.shrink_z)})` },
        { key: "sintered_density_g_cm3", label: "ρ sintered", align: "right" },
        { key: "default_profile_code", label: "Profile" },
      ]}
    />
  );
}
