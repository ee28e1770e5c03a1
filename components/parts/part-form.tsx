"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useForm, useWatch } from "react-hook-form";
import type { z } from "zod";
import { useMemo, useState } from "react";
import { createPartSchema } from "@/lib/parts/schemas";
import { stockAdvice } from "@/lib/process/stock";
import { scaleUp } from "@/lib/process/scale-up";
import { ApiError, apiJson } from "@/components/floor/api";
import { Field, inputClass } from "./field";
import { FormError } from "@/components/ui/form-error";

type Input = z.input<typeof createPartSchema>;
type Output = z.output<typeof createPartSchema>;

export type MaterialChoice = { id: string; code: string; name: string; shrink_xy: number; shrink_z: number; active: boolean };
export type OrderChoice = { id: string; code: string; customer: string };

const FACES = [
  ["stock_x_neg_mm", "x_neg", "X −"],
  ["stock_x_pos_mm", "x_pos", "X +"],
  ["stock_y_neg_mm", "y_neg", "Y −"],
  ["stock_y_pos_mm", "y_pos", "Y +"],
  ["stock_z_neg_mm", "z_neg", "Z − (plate side)"],
  ["stock_z_pos_mm", "z_pos", "Z +"],
] as const;

export type PartFormProps = {
  materials: MaterialChoice[];
  orders: OrderChoice[];
  part?: Record<string, unknown> & { id: string; version: number; order_id: string };
  defaultOrderId?: string;
  onSaved: (part: { id: string }) => void;
};

const str = (v: unknown) => (v === null || v === undefined ? "" : String(v));

/** Create or edit a part. The same zod schema checks the fields here and in the API. */
export function PartForm({ materials, orders, part, defaultOrderId, onSaved }: PartFormProps) {
  const [formError, setFormError] = useState<string | null>(null);
  const [finished, setFinished] = useState<Record<string, boolean>>({});
  const [advice, setAdvice] = useState<string | null>(null);
  const defaults: Input = {
    order_id: part?.order_id ?? defaultOrderId ?? "",
    part_number: str(part?.part_number),
    revision: str(part?.revision ?? "A"),
    name: str(part?.name),
    material_id: str(part?.material_id),
    quantity: str(part?.quantity ?? 1),
    nominal_x_mm: str(part?.nominal_x_mm),
    nominal_y_mm: str(part?.nominal_y_mm),
    nominal_z_mm: str(part?.nominal_z_mm),
    thickest_wall_mm: str(part?.thickest_wall_mm),
    stock_x_neg_mm: str(part?.stock_x_neg_mm ?? 0),
    stock_x_pos_mm: str(part?.stock_x_pos_mm ?? 0),
    stock_y_neg_mm: str(part?.stock_y_neg_mm ?? 0),
    stock_y_pos_mm: str(part?.stock_y_pos_mm ?? 0),
    stock_z_neg_mm: str(part?.stock_z_neg_mm ?? 0),
    stock_z_pos_mm: str(part?.stock_z_pos_mm ?? 0),
    finishing_notes: str(part?.finishing_notes),
    target_ra_um: str(part?.target_ra_um),
    tolerance_um: str(part?.tolerance_um),
    tolerance_grade: str(part?.tolerance_grade),
  };
  const { register, handleSubmit, setError, setValue, control, formState } = useForm<Input, unknown, Output>({ resolver: zodResolver(createPartSchema), defaultValues: defaults });
  const errors = formState.errors;
  const watched = useWatch({ control });

  // What the printer will make of it, before saving: the same scale-up the API stores.
  const preview = useMemo(() => {
    const m = materials.find((x) => x.id === watched.material_id);
    const num = (v: unknown) => Number(String(v ?? "").replace(",", "."));
    const nominal = { x: num(watched.nominal_x_mm), y: num(watched.nominal_y_mm), z: num(watched.nominal_z_mm) };
    if (!m || !(nominal.x > 0 && nominal.y > 0 && nominal.z > 0)) return null;
    try {
      const s = scaleUp({
        nominal,
        stock: {
          x_neg: num(watched.stock_x_neg_mm) || 0, x_pos: num(watched.stock_x_pos_mm) || 0, y_neg: num(watched.stock_y_neg_mm) || 0,
          y_pos: num(watched.stock_y_pos_mm) || 0, z_neg: num(watched.stock_z_neg_mm) || 0, z_pos: num(watched.stock_z_pos_mm) || 0,
        },
        shrink: { xy: m.shrink_xy, z: m.shrink_z },
      });
      return `${s.x.green.toFixed(2)} × ${s.y.green.toFixed(2)} × ${s.z.green.toFixed(2)} mm green (factors ${s.x.factor.toFixed(4)} XY, ${s.z.factor.toFixed(4)} Z)`;
    } catch {
      return null;
    }
  }, [watched, materials]);

  function suggestStock() {
    const num = (v: unknown) => Number(String(v ?? "").replace(",", "."));
    const nominal = { x: num(watched.nominal_x_mm), y: num(watched.nominal_y_mm), z: num(watched.nominal_z_mm) };
    if (!(nominal.x > 0 && nominal.y > 0 && nominal.z > 0)) {
      setAdvice("Enter the nominal size first.");
      return;
    }
    const faces = Object.fromEntries(FACES.map(([, key]) => [key, !!finished[key]]));
    if (!Object.values(faces).some(Boolean)) {
      setAdvice("Tick the faces that will be ground or machined.");
      return;
    }
    const a = stockAdvice({ nominal, finishedFaces: faces });
    for (const [field, key] of FACES) setValue(field, String(a.stock[key]), { shouldValidate: true });
    const lines = FACES.filter(([, key]) => a.faces[key]).map(([, key, label]) => `${label}: ${a.faces[key]!.stockMm} mm (${a.faces[key]!.governedBy === "scatter" ? "sintered scatter + clean-up" : "minimum"})`);
    setAdvice(`Suggested from ±0.3 % sintered scatter, 0.1 mm clean-up and a 0.2 mm minimum. ${lines.join("; ")}. Unticked faces get none.`);
  }

  async function submit(values: Output) {
    setFormError(null);
    try {
      const res = part
        ? await apiJson<{ part: { id: string } }>(`/api/parts/${part.id}`, { method: "PATCH", body: { ...values, order_id: undefined, version: part.version } })
        : await apiJson<{ part: { id: string } }>("/api/parts", { method: "POST", body: values });
      onSaved(res.part);
    } catch (err) {
      const e = err as ApiError;
      for (const [field, msgs] of Object.entries(e.fieldErrors ?? {})) {
        if (field in createPartSchema.shape) setError(field as keyof Input, { message: msgs[0] });
      }
      setFormError(e.message);
    }
  }

  const num = (name: keyof Input, label: string, opts: { hint?: string; step?: string } = {}) => (
    <Field label={label} error={errors[name]} hint={opts.hint}>
      <input inputMode="decimal" {...register(name)} className={`${inputClass} tabular`} aria-invalid={!!errors[name]} />
    </Field>
  );

  return (
    <form onSubmit={handleSubmit(submit)} className="space-y-4" noValidate data-testid="part-form">
      <div className="grid grid-cols-4 gap-3">
        <Field label="Order" error={errors.order_id} className="col-span-2">
          <select {...register("order_id")} className={inputClass} disabled={!!part} aria-invalid={!!errors.order_id}>
            <option value="">Choose an order…</option>
            {orders.map((o) => (
              <option key={o.id} value={o.id}>{o.code} · {o.customer}</option>
            ))}
          </select>
        </Field>
        <Field label="Material" error={errors.material_id} className="col-span-2">
          <select {...register("material_id")} className={inputClass} aria-invalid={!!errors.material_id}>
            <option value="">Choose a material…</option>
            {materials.filter((m) => m.active || m.id === part?.material_id).map((m) => (
              <option key={m.id} value={m.id}>{m.code} · {m.name}</option>
            ))}
          </select>
        </Field>
        <Field label="Part number" error={errors.part_number}>
          <input {...register("part_number")} className={inputClass} aria-invalid={!!errors.part_number} />
        </Field>
        <Field label="Revision" error={errors.revision}>
          <input {...register("revision")} className={inputClass} />
        </Field>
        <Field label="Name" error={errors.name}>
          <input {...register("name")} className={inputClass} aria-invalid={!!errors.name} />
        </Field>
        {num("quantity", "Quantity (units)")}
      </div>

      <fieldset className="rounded-md border border-soot-200 p-3">
        <legend className="px-1 text-xs font-semibold text-soot-600">Finished size (as drawn), mm</legend>
        <div className="grid grid-cols-4 gap-3">
          {num("nominal_x_mm", "X")}
          {num("nominal_y_mm", "Y")}
          {num("nominal_z_mm", "Z (build direction)")}
          {num("thickest_wall_mm", "Thickest wall", { hint: "sets the wash time" })}
        </div>
      </fieldset>

      <fieldset className="rounded-md border border-soot-200 p-3">
        <legend className="px-1 text-xs font-semibold text-soot-600">Stock left for finishing, per face, mm</legend>
        <div className="grid grid-cols-6 gap-3">
          {FACES.map(([field, key, label]) => (
            <div key={field}>
              {num(field, label)}
              <label className="mt-1 flex items-center gap-1 text-2xs text-soot-600">
                <input type="checkbox" checked={!!finished[key]} onChange={(e) => setFinished((f) => ({ ...f, [key]: e.target.checked }))} />
                finished face
              </label>
            </div>
          ))}
        </div>
        <div className="mt-2 flex flex-wrap items-center gap-3">
          <button type="button" onClick={suggestStock} className="rounded-md border border-clay-400 px-2.5 py-1 text-xs font-semibold text-clay-700 hover:bg-clay-50">
            Suggest stock
          </button>
          {advice ? <span className="text-2xs text-soot-600" data-testid="stock-advice">{advice}</span> : null}
        </div>
        {preview ? <p className="mt-2 text-xs font-medium text-clay-800" data-testid="green-preview">{preview}</p> : null}
      </fieldset>

      <div className="grid grid-cols-4 gap-3">
        {num("target_ra_um", "Target Ra, µm")}
        {num("tolerance_um", "Tolerance ±, µm")}
        <Field label="or ISO 286-1 grade" error={errors.tolerance_grade}>
          <input {...register("tolerance_grade")} placeholder="IT7" className={inputClass} aria-invalid={!!errors.tolerance_grade} />
        </Field>
        <div />
        <Field label="Finishing notes" error={errors.finishing_notes} className="col-span-4">
          <textarea {...register("finishing_notes")} rows={2} className={inputClass} />
        </Field>
      </div>
      {formError ? <FormError>{formError}</FormError> : null}
      <div className="flex justify-end">
        <button type="submit" disabled={formState.isSubmitting} className="rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          {part ? "Save part" : "Create part"}
        </button>
      </div>
    </form>
  );
}
