"use client";

import { RecordTable } from "./record-table";
import type { FieldDef } from "./record-form";

type Row = Record<string, unknown>;
export type EquipmentTablesProps = {
  printers: Row[];
  washStations: Row[];
  furnaces: Row[];
  materials: { id: string; code: string }[];
  profiles: { id: string; code: string; revision: number; retired: boolean }[];
};

const dims = (r: Row, a: string, b: string, c?: string) => [r[a], r[b], c ? r[c] : null].filter((x) => x !== null).join(" × ") + " mm";
const pick = (r: Row, keys: string[]) => Object.fromEntries(keys.map((k) => [k, r[k]]));

export function EquipmentTables({ printers, washStations, furnaces, materials, profiles }: EquipmentTablesProps) {
  const materialOptions = materials.map((m) => ({ value: m.id, label: m.code }));
  const profileOptions = profiles.filter((p) => !p.retired).map((p) => ({ value: p.id, label: `${p.code} r${p.revision}` }));

  const printerFields: FieldDef[] = [
    { name: "name", label: "Name", type: "text" },
    { name: "model_note", label: "Model / note", type: "text" },
    { name: "build_x_mm", label: "Build X", type: "number", unit: "mm" },
    { name: "build_y_mm", label: "Build Y", type: "number", unit: "mm" },
    { name: "build_z_mm", label: "Build Z", type: "number", unit: "mm" },
    { name: "deposition_cm3_per_h", label: "Deposition rate", type: "number", unit: "cm³/h" },
    { name: "layer_height_mm", label: "Layer height", type: "number", unit: "mm" },
    { name: "layer_overhead_s", label: "Per-layer overhead", type: "number", unit: "s", hint: "travel, wipe and cooling per layer" },
    { name: "active", label: "In service", type: "checkbox" },
    { name: "material_ids", label: "Materials it prints", type: "multi", options: materialOptions },
  ];
  const washFields: FieldDef[] = [
    { name: "name", label: "Name", type: "text" },
    { name: "solvent", label: "Solvent", type: "text" },
    { name: "basket_x_mm", label: "Basket X", type: "number", unit: "mm" },
    { name: "basket_y_mm", label: "Basket Y", type: "number", unit: "mm" },
    { name: "basket_z_mm", label: "Basket Z", type: "number", unit: "mm" },
    { name: "capacity_units", label: "Capacity", type: "number", unit: "units", step: "1" },
    { name: "max_load_g", label: "Maximum load", type: "number", unit: "g" },
    { name: "active", label: "In service", type: "checkbox" },
  ];
  const furnaceFields: FieldDef[] = [
    { name: "name", label: "Name", type: "text" },
    { name: "tray_x_mm", label: "Tray X", type: "number", unit: "mm" },
    { name: "tray_y_mm", label: "Tray Y", type: "number", unit: "mm" },
    { name: "tray_count", label: "Trays", type: "number", step: "1" },
    { name: "usable_height_mm", label: "Usable height", type: "number", unit: "mm", hint: "per tray level, setters included" },
    { name: "max_load_g", label: "Maximum load", type: "number", unit: "g" },
    { name: "max_cool_rate_c_per_min", label: "Fastest cooling", type: "number", unit: "°C/min" },
    { name: "active", label: "In service", type: "checkbox" },
    { name: "profile_ids", label: "Sinter profiles it runs", type: "multi", options: profileOptions },
  ];

  return (
    <div className="space-y-6">
      <RecordTable
        title="Printers"
        noun="printer"
        endpoint="/api/printers"
        rows={printers}
        fields={printerFields}
        blank={{ name: "", model_note: "", build_x_mm: 300, build_y_mm: 220, build_z_mm: 180, deposition_cm3_per_h: 20, layer_height_mm: 0.15, layer_overhead_s: 8, active: true, material_ids: [] }}
        toForm={(r) => ({ ...pick(r, printerFields.map((f) => f.name)), material_ids: (r.materials as { id: string }[]).map((m) => m.id) })}
        columns={[
          { key: "name", label: "Name" },
          { key: "build", label: "Build volume", render: (r) => dims(r, "build_x_mm", "build_y_mm", "build_z_mm") },
          { key: "deposition_cm3_per_h", label: "cm³/h", align: "right" },
          { key: "materials", label: "Materials", render: (r) => (r.materials as { code: string }[]).map((m) => m.code).join(", ") || "—" },
          { key: "active", label: "State", render: (r) => (r.active ? "in service" : "out of service") },
        ]}
      />
      <RecordTable
        title="Wash stations"
        noun="wash station"
        endpoint="/api/wash-stations"
        rows={washStations}
        fields={washFields}
        blank={{ name: "", solvent: "", basket_x_mm: 400, basket_y_mm: 300, basket_z_mm: 200, capacity_units: 20, max_load_g: 10000, active: true }}
        toForm={(r) => pick(r, washFields.map((f) => f.name))}
        columns={[
          { key: "name", label: "Name" },
          { key: "solvent", label: "Solvent" },
          { key: "basket", label: "Basket", render: (r) => dims(r, "basket_x_mm", "basket_y_mm", "basket_z_mm") },
          { key: "capacity_units", label: "Units", align: "right" },
          { key: "max_load_g", label: "Load g", align: "right" },
        ]}
      />
      <RecordTable
        title="Furnaces"
        noun="furnace"
        endpoint="/api/furnaces"
        rows={furnaces}
        fields={furnaceFields}
        blank={{ name: "", tray_x_mm: 300, tray_y_mm: 250, tray_count: 3, usable_height_mm: 120, max_load_g: 15000, max_cool_rate_c_per_min: 10, active: true, profile_ids: [] }}
        toForm={(r) => ({ ...pick(r, furnaceFields.map((f) => f.name)), profile_ids: (r.profiles as { id: string }[]).map((p) => p.id) })}
        columns={[
          { key: "name", label: "Name" },
          { key: "trays", label: "Trays", render: (r) => `${r.tray_count} × ${dims(r, "tray_x_mm", "tray_y_mm")}` },
          { key: "usable_height_mm", label: "Height mm", align: "right" },
          { key: "max_load_g", label: "Load g", align: "right" },
          { key: "profiles", label: "Profiles", render: (r) => (r.profiles as { code: string }[]).map((p) => p.code).join(", ") || "—" },
        ]}
      />
    </div>
  );
}
