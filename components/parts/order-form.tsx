"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { useForm } from "react-hook-form";
import type { z } from "zod";
import { useState } from "react";
import { createOrderSchema } from "@/lib/parts/schemas";
import { ApiError, apiJson } from "@/components/floor/api";
import { Field, inputClass } from "./field";
import { FormError } from "@/components/ui/form-error";

type Input = z.input<typeof createOrderSchema>;
type Output = z.output<typeof createOrderSchema>;

export type OrderFormProps = {
  order?: { id: string; code: string; customer: string; project: string; due_at: string; priority: number; notes: string; version: number };
  canPrioritize: boolean;
  onSaved: (order: { id: string; code: string }) => void;
};

/** Create or edit an order; the same schema checks it here and in the API. */
export function OrderForm({ order, canPrioritize, onSaved }: OrderFormProps) {
  const [formError, setFormError] = useState<string | null>(null);
  const { register, handleSubmit, setError, formState } = useForm<Input, unknown, Output>({
    resolver: zodResolver(createOrderSchema),
    defaultValues: order
      ? { code: order.code, customer: order.customer, project: order.project, due_at: order.due_at.slice(0, 10), priority: String(order.priority), notes: order.notes }
      : { code: "", customer: "", project: "", due_at: "", priority: "3", notes: "" },
  });
  const errors = formState.errors;

  async function submit(values: Output) {
    setFormError(null);
    const { priority, ...rest } = { ...values, due_at: values.due_at.toISOString() };
    // A disabled select sends nothing; without this the schema's default would look like a change.
    const body = order && !canPrioritize ? rest : { ...rest, priority };
    try {
      const res = order
        ? await apiJson<{ order: { id: string; code: string } }>(`/api/orders/${order.id}`, { method: "PATCH", body: { ...body, version: order.version } })
        : await apiJson<{ order: { id: string; code: string } }>("/api/orders", { method: "POST", body });
      onSaved(res.order);
    } catch (err) {
      const e = err as ApiError;
      for (const [field, msgs] of Object.entries(e.fieldErrors ?? {})) {
        if (field in createOrderSchema.shape) setError(field as keyof Input, { message: msgs[0] });
      }
      setFormError(e.message);
    }
  }

  return (
    <form onSubmit={handleSubmit(submit)} className="grid grid-cols-2 gap-3" noValidate data-testid="order-form">
      <Field label="Work order number" error={errors.code}>
        <input {...register("code")} className={inputClass} aria-invalid={!!errors.code} autoComplete="off" />
      </Field>
      <Field label="Customer or internal project" error={errors.customer}>
        <input {...register("customer")} className={inputClass} aria-invalid={!!errors.customer} />
      </Field>
      <Field label="Project (optional)" error={errors.project}>
        <input {...register("project")} className={inputClass} />
      </Field>
      <Field label="Due date" error={errors.due_at}>
        <input type="date" {...register("due_at")} className={inputClass} aria-invalid={!!errors.due_at} />
      </Field>
      <Field label="Priority (1 most urgent)" error={errors.priority} hint={order && !canPrioritize ? "a manager sets priorities" : undefined}>
        <select {...register("priority")} className={inputClass} disabled={!!order && !canPrioritize}>
          {[1, 2, 3, 4, 5].map((p) => (
            <option key={p} value={p}>{p}</option>
          ))}
        </select>
      </Field>
      <Field label="Notes" error={errors.notes} className="col-span-2">
        <textarea {...register("notes")} rows={2} className={inputClass} />
      </Field>
      {formError ? <FormError className="col-span-2">{formError}</FormError> : null}
      <div className="col-span-2 flex justify-end">
        <button type="submit" disabled={formState.isSubmitting} className="rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          {order ? "Save order" : "Create order"}
        </button>
      </div>
    </form>
  );
}
