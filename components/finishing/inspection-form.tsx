"use client";

import { useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import { inToMm, mmToIn, toFixedClean, type UnitSystem } from "@/lib/units";
import { createInspectionSchema, AXES, type Axis, type CreateInspectionInput } from "@/lib/finishing/schemas";
import { plannedGreen, realizedPerAxis, runoutStockCheck, sizeDeviations, stockLeft, type StockCheck } from "@/lib/finishing/inspection";
import type { FinishingCard } from "@/lib/finishing/types";
import { ApiError, sendJson } from "./api";
import { ra, stockCheckText } from "./format";

// The inspection record, typed in the machinist's own units. The same schema as the API
// checks it before it is sent; the stock check and the realized shrinkage show as you type.

type AxisFields = Record<Axis, string>;
type FormValues = {
  green_source: "planned" | "measured";
  green: AxisFields;
  sintered: AxisFields;
  finished: AxisFields;
  ra: string;
  runout: string;
  runout_axis: "" | Axis;
  verdict: "" | "pass" | "fail";
  reason: string;
  notes: string;
};

export type InspectionFormProps = {
  unit: FinishingCard;
  units: UnitSystem;
  onSaved: (result: { id: string; unit_version: number; stock_check: StockCheck | null }) => void;
};

const EMPTY: AxisFields = { x: "", y: "", z: "" };
const toNum = (s: string) => (s.trim() === "" ? undefined : Number(s.replace(",", ".")));
const toMm = (v: number | undefined, units: UnitSystem) => (v === undefined || !Number.isFinite(v) ? undefined : units === "in" ? inToMm(v) : v);

export function InspectionForm({ unit, units, onSaved }: InspectionFormProps) {
  const planned = useMemo(() => plannedGreen(unit.part, unit.build?.scale_snapshot), [unit]);
  const { register, handleSubmit, control, setError, clearErrors, reset, formState } = useForm<FormValues>({
    defaultValues: { green_source: "planned", green: EMPTY, sintered: EMPTY, finished: EMPTY, ra: "", runout: "", runout_axis: "", verdict: "", reason: "", notes: "" },
  });
  const values = useWatch({ control }) as FormValues;
  const [serverError, setServerError] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const lengthUnit = units === "in" ? "in" : "mm";
  const raUnit = units === "in" ? "µin" : "µm";

  const build = (v: FormValues): CreateInspectionInput => {
    const axes = (f: AxisFields) => Object.fromEntries(AXES.map((a) => [a, toNum(f[a])]).filter(([, n]) => n !== undefined));
    return {
      unit_id: unit.id,
      version: unit.version,
      units,
      green_source: v.green_source,
      green: v.green_source === "planned" ? {} : axes(v.green),
      sintered: axes(v.sintered),
      finished: axes(v.finished),
      ra: toNum(v.ra),
      runout: toNum(v.runout),
      runout_axis: v.runout_axis || undefined,
      passed: v.verdict === "" ? (undefined as unknown as boolean) : v.verdict === "pass",
      reason: v.reason.trim() || undefined,
      notes: v.notes.trim(),
    };
  };

  // Live hints from the same lib/ functions the server uses.
  const sinteredMm = Object.fromEntries(AXES.map((a) => [a, toMm(toNum(values.sintered?.[a] ?? ""), units)])) as Partial<Record<Axis, number>>;
  const greenMm =
    values.green_source === "planned"
      ? planned
      : (Object.fromEntries(AXES.map((a) => [a, toMm(toNum(values.green?.[a] ?? ""), units)])) as Partial<Record<Axis, number>>);
  const realized = realizedPerAxis(greenMm, sinteredMm);
  const finishedMm = Object.fromEntries(AXES.map((a) => [a, toMm(toNum(values.finished?.[a] ?? ""), units)]).filter(([, n]) => n !== undefined)) as Partial<Record<Axis, number>>;
  const deviations = sizeDeviations(unit.part, finishedMm);
  const runoutMm = toMm(toNum(values.runout ?? ""), units);
  let stockCheck: StockCheck | null = null;
  if (runoutMm !== undefined && runoutMm >= 0 && values.runout_axis) {
    try {
      stockCheck = runoutStockCheck(unit.part, values.runout_axis, runoutMm, sinteredMm[values.runout_axis]);
    } catch {
      stockCheck = null;
    }
  }

  const onSubmit = async (v: FormValues) => {
    setServerError(null);
    clearErrors();
    const body = build(v);
    const parsed = createInspectionSchema.safeParse(body);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) setError(fieldName(issue.path.map(String)), { message: issue.message });
      return;
    }
    setSaving(true);
    try {
      const res = await sendJson<{ id: string; unit_version: number; stock_check: StockCheck | null }>("/api/inspections", "POST", body);
      reset();
      onSaved(res);
    } catch (err) {
      if (err instanceof ApiError && err.fieldErrors) {
        for (const [k, msgs] of Object.entries(err.fieldErrors)) setError(fieldName(k.split(".")), { message: msgs[0] });
      }
      setServerError(err instanceof ApiError ? err.message : "The inspection could not be saved.");
    } finally {
      setSaving(false);
    }
  };

  const err = (name: string) => {
    const e = name.split(".").reduce<unknown>((o, k) => (o as Record<string, unknown> | undefined)?.[k], formState.errors) as { message?: string } | undefined;
    return e?.message ? <p className="mt-0.5 text-2xs text-oxide-700" role="alert">{e.message}</p> : null;
  };
  const input = "w-full rounded-md border border-soot-300 bg-white px-2 py-1 text-sm tabular focus:border-clay-500";
  const showPlanned = (a: Axis) => (planned[a] === undefined ? "–" : toFixedClean(units === "in" ? mmToIn(planned[a]!) : planned[a]!, units === "in" ? 4 : 2));

  return (
    <form onSubmit={handleSubmit(onSubmit)} noValidate aria-label="Record an inspection" className="space-y-4" data-testid="inspection-form">
      <fieldset className="rounded-card border border-soot-200 p-3">
        <legend className="px-1 text-sm font-semibold text-soot-800">Sizes ({lengthUnit})</legend>
        <div className="mb-2 flex flex-wrap gap-4 text-sm">
          <label className="flex items-center gap-1.5">
            <input type="radio" value="planned" {...register("green_source")} /> Green size as printed (from the scale-up)
          </label>
          <label className="flex items-center gap-1.5">
            <input type="radio" value="measured" {...register("green_source")} /> Green size measured
          </label>
        </div>
        <table className="w-full text-sm">
          <thead>
            <tr className="text-left text-2xs uppercase tracking-wide text-soot-500">
              <th className="w-10 py-1" />
              <th className="py-1 pr-2">Green</th>
              <th className="py-1 pr-2">As sintered</th>
              <th className="py-1 pr-2">Finished</th>
              <th className="py-1">What it means</th>
            </tr>
          </thead>
          <tbody>
            {AXES.map((a) => {
              const dev = deviations.find((d) => d.axis === a);
              const left = sinteredMm[a] !== undefined ? stockLeft(unit.part, a, sinteredMm[a]) : null;
              return (
                <tr key={a} className="align-top">
                  <th scope="row" className="py-1 text-left font-semibold">{a.toUpperCase()}</th>
                  <td className="py-1 pr-2">
                    {values.green_source === "planned" ? (
                      <span className="tabular inline-block px-2 py-1 text-soot-600" data-testid={`planned-green-${a}`}>{showPlanned(a)}</span>
                    ) : (
                      <>
                        <input aria-label={`Green ${a.toUpperCase()}`} inputMode="decimal" className={input} {...register(`green.${a}`)} />
                        {err(`green.${a}`)}
                      </>
                    )}
                  </td>
                  <td className="py-1 pr-2">
                    <input aria-label={`As sintered ${a.toUpperCase()}`} inputMode="decimal" className={input} {...register(`sintered.${a}`)} />
                    {err(`sintered.${a}`)}
                  </td>
                  <td className="py-1 pr-2">
                    <input aria-label={`Finished ${a.toUpperCase()}`} inputMode="decimal" className={input} {...register(`finished.${a}`)} />
                    {err(`finished.${a}`)}
                  </td>
                  <td className="py-1 text-xs text-soot-600">
                    {realized[a] !== undefined ? <div>shrinkage {(realized[a]! * 100).toFixed(2)} %</div> : null}
                    {left ? (
                      <div className={left.perSideMm < 0 ? "text-oxide-700" : ""}>
                        stock left {toFixedClean(units === "in" ? mmToIn(left.perSideMm) : left.perSideMm, units === "in" ? 4 : 3)} {lengthUnit} per side
                      </div>
                    ) : null}
                    {dev ? (
                      <div className={dev.withinPlusMinus === false ? "text-oxide-700" : ""}>
                        {dev.deviationUm >= 0 ? "+" : ""}
                        {dev.deviationUm.toFixed(0)} µm from nominal{dev.withinPlusMinus === undefined ? "" : dev.withinPlusMinus ? " (within ±)" : " (outside ±)"}
                      </div>
                    ) : null}
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
        {err("finished")}
      </fieldset>

      <div className="grid grid-cols-1 gap-4 md:grid-cols-3">
        <label className="block text-sm">
          <span className="font-semibold text-soot-800">Ra ({raUnit})</span>
          <input inputMode="decimal" aria-label={`Ra in ${raUnit}`} className={`${input} mt-1`} {...register("ra")} />
          <span className="text-2xs text-soot-500">
            target {unit.part.target_ra_um ? ra(unit.part.target_ra_um, units) : "none"}
          </span>
          {err("ra")}
        </label>
        <label className="block text-sm">
          <span className="font-semibold text-soot-800">Runout, TIR ({lengthUnit})</span>
          <input inputMode="decimal" aria-label={`Runout in ${lengthUnit}`} className={`${input} mt-1`} {...register("runout")} />
          {err("runout")}
        </label>
        <label className="block text-sm">
          <span className="font-semibold text-soot-800">Diameter across</span>
          <select aria-label="Runout measured across" className={`${input} mt-1`} {...register("runout_axis")}>
            <option value="">–</option>
            {AXES.map((a) => (
              <option key={a} value={a}>{a.toUpperCase()}</option>
            ))}
          </select>
          {err("runout_axis")}
        </label>
      </div>
      {stockCheck ? (
        <p role="status" data-testid="stock-check" className={`rounded-md px-3 py-2 text-sm ${stockCheck.status === "warning" ? "bg-brass-100 text-brass-600" : "bg-verdigris-100 text-verdigris-700"}`}>
          {stockCheck.status === "warning" ? "Stock warning: " : "Stock check: "}
          {stockCheckText(stockCheck, units)}
          {stockCheck.stockSource === "planned" ? " (planned stock; enter the as-sintered size for the real one)" : ""}
        </p>
      ) : null}

      <fieldset className="space-y-2">
        <legend className="text-sm font-semibold text-soot-800">Result</legend>
        <div className="flex gap-4 text-sm">
          <label className="flex items-center gap-1.5">
            <input type="radio" value="pass" {...register("verdict")} /> Pass
          </label>
          <label className="flex items-center gap-1.5">
            <input type="radio" value="fail" {...register("verdict")} /> Fail
          </label>
        </div>
        {err("verdict")}
        <label className="block text-sm">
          <span className="text-soot-700">Reason {values.verdict === "fail" ? "(required)" : "(optional)"}</span>
          <input className={`${input} mt-1`} aria-label="Reason" {...register("reason")} />
          {err("reason")}
        </label>
        <label className="block text-sm">
          <span className="text-soot-700">Notes</span>
          <textarea rows={2} className={`${input} mt-1`} aria-label="Notes" {...register("notes")} />
        </label>
      </fieldset>

      {serverError ? <p role="alert" className="rounded-md bg-oxide-100 px-3 py-2 text-sm text-oxide-700">{serverError}</p> : null}
      <button type="submit" disabled={saving} className="rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
        {saving ? "Saving…" : "Save inspection"}
      </button>
    </form>
  );
}

/** Maps a schema path onto the form's field names (passed → verdict). */
function fieldName(path: string[]): never {
  const name = path[0] === "passed" ? "verdict" : path.join(".");
  return (name || "root") as never;
}
