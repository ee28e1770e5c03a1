"use client";

import { useCallback, useEffect, useState } from "react";
import { ApiError, getJson, sendJson } from "@/lib/http/client";

type Settings = Record<string, number | string> & { version: number; currency: string; minor_digits: number };
type PrinterRate = { id: string; name: string; active: boolean; rate_minor_per_h: number | null };
type FurnaceRate = { id: string; name: string; active: boolean; run_cost_minor: number | null; gas_cost_minor: number | null; energy_cost_minor: number | null };
type MaterialRate = { id: string; code: string; name: string; feedstock_minor_per_kg: number; infill_fraction: number; support_fraction: number; rates_set: boolean };

const FIELDS: Array<[string, string]> = [
  ["currency", "Currency (ISO 4217)"],
  ["minor_digits", "Digits after the point"],
  ["printer_rate_minor_per_h", "Printer, minor units per hour"],
  ["wash_batch_cost_minor", "Wash batch cost, minor units"],
  ["wash_batch_volume_cm3", "Typical wash batch green volume, cm³"],
  ["furnace_run_cost_minor", "Furnace run, minor units"],
  ["furnace_gas_cost_minor", "Process gas per run, minor units"],
  ["furnace_energy_cost_minor", "Energy per run, minor units"],
  ["finishing_rate_minor_per_h", "Finishing, minor units per hour"],
  ["finishing_min_per_cm2", "Finishing minutes per cm² of stocked face"],
  ["inspection_rate_minor_per_h", "Inspection, minor units per hour"],
  ["inspection_min_per_unit", "Inspection minutes per unit"],
  ["setup_minor_per_order", "Set-up per order, minor units"],
  ["overhead_bp", "Overhead, basis points (1500 = 15 %)"],
  ["margin_bp", "Margin, basis points"],
  ["fallback_yield", "Yield before any outcome is recorded (0–1)"],
  ["validity_days", "Quotes valid for, days"],
];

export function QuoteSettingsForm() {
  const [s, setS] = useState<Settings | null>(null);
  const [materials, setMaterials] = useState<MaterialRate[]>([]);
  const [printers, setPrinters] = useState<PrinterRate[]>([]);
  const [furnaces, setFurnaces] = useState<FurnaceRate[]>([]);
  const [msg, setMsg] = useState<{ ok: boolean; text: string } | null>(null);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string[]>>({});
  const load = useCallback(() => {
    getJson<{ settings: Settings; materials: MaterialRate[]; printers: PrinterRate[]; furnaces: FurnaceRate[] }>("/api/quote-settings").then((d) => {
      setS(d.settings);
      setMaterials(d.materials);
      setPrinters(d.printers);
      setFurnaces(d.furnaces);
    }, (e) => setMsg({ ok: false, text: e.message }));
  }, []);
  useEffect(load, [load]);
  if (!s) return <p className="px-8 py-6 text-sm text-soot-500">{msg?.text ?? "Loading…"}</p>;

  async function save(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    setFieldErrors({});
    try {
      await sendJson("/api/quote-settings", "PUT", { ...Object.fromEntries(new FormData(e.currentTarget)), version: s!.version });
      setMsg({ ok: true, text: "Saved." });
      load();
    } catch (err) {
      if (err instanceof ApiError) setFieldErrors(err.fieldErrors ?? {});
      setMsg({ ok: false, text: err instanceof Error ? err.message : String(err) });
    }
  }
  async function saveMaterial(e: React.FormEvent<HTMLFormElement>, id: string) {
    e.preventDefault();
    try {
      await sendJson("/api/quote-settings/materials", "PUT", { ...Object.fromEntries(new FormData(e.currentTarget)), material_id: id });
      setMsg({ ok: true, text: "Saved." });
      load();
    } catch (err) {
      setMsg({ ok: false, text: err instanceof Error ? err.message : String(err) });
    }
  }
  async function saveEquipment(e: React.FormEvent<HTMLFormElement>, body: Record<string, string>) {
    e.preventDefault();
    try {
      await sendJson("/api/quote-settings/equipment", "PUT", { ...Object.fromEntries(new FormData(e.currentTarget)), ...body });
      setMsg({ ok: true, text: "Saved." });
      load();
    } catch (err) {
      setMsg({ ok: false, text: err instanceof Error ? err.message : String(err) });
    }
  }
  const input = "min-h-11 w-full rounded-md border border-soot-300 px-2 py-2 text-sm";
  const own = (v: number | null) => (v === null ? "" : String(v));
  return (
    <div className="space-y-6 px-4 py-6 sm:px-8">
      {msg ? <p role={msg.ok ? "status" : "alert"} className={`rounded-md px-3 py-2 text-sm ${msg.ok ? "bg-verdigris-50 text-verdigris-800" : "bg-oxide-100 text-oxide-700"}`}>{msg.text}</p> : null}
      <form onSubmit={save} className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="rates-h">
        <h2 id="rates-h" className="font-display text-base font-semibold text-soot-900">Shop rates</h2>
        <p className="text-xs text-soot-500">Money in whole minor units of the currency (cents for EUR or USD).</p>
        <div className="mt-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          {FIELDS.map(([k, label]) => (
            <label key={k} className="block text-sm">
              <span className="block text-xs text-soot-600">{label}</span>
              <input name={k} defaultValue={String(s[k])} inputMode={k === "currency" ? "text" : "decimal"} className={input} aria-invalid={!!fieldErrors[k]} />
              {fieldErrors[k] ? <span className="text-xs text-oxide-700">{fieldErrors[k][0]}</span> : null}
            </label>
          ))}
        </div>
        <button type="submit" className="mt-3 min-h-11 rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700">Save rates</button>
      </form>
      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="equip-h">
        <h2 id="equip-h" className="font-display text-base font-semibold text-soot-900">Rates per printer and furnace</h2>
        <p className="text-xs text-soot-500">Leave a field empty to use the shop rate above (shown greyed in the field). A quote prices each line on the printer and furnace its plan chose.</p>
        <div className="mt-2 space-y-3">
          {printers.map((p) => (
            <form key={p.id} onSubmit={(e) => saveEquipment(e, { kind: "printer", printer_id: p.id })} className="grid items-end gap-2 border-t border-soot-100 pt-3 sm:grid-cols-5" aria-label={`Rate for printer ${p.name}`}>
              <p className="text-sm font-semibold sm:col-span-2">{p.name}<span className="block text-2xs font-normal text-soot-500">printer{p.active ? "" : ", inactive"}{p.rate_minor_per_h === null ? ", shop rate" : ""}</span></p>
              <label className="block text-sm sm:col-span-2"><span className="block text-xs text-soot-600">Minor units per hour</span><input name="rate_minor_per_h" inputMode="numeric" defaultValue={own(p.rate_minor_per_h)} placeholder={String(s.printer_rate_minor_per_h)} className={input} /></label>
              <button type="submit" className="min-h-11 rounded-md border border-soot-300 px-3 py-2 text-sm font-semibold">Save {p.name}</button>
            </form>
          ))}
          {furnaces.map((f) => (
            <form key={f.id} onSubmit={(e) => saveEquipment(e, { kind: "furnace", furnace_id: f.id })} className="grid items-end gap-2 border-t border-soot-100 pt-3 sm:grid-cols-5" aria-label={`Run cost for furnace ${f.name}`}>
              <p className="text-sm font-semibold">{f.name}<span className="block text-2xs font-normal text-soot-500">furnace{f.active ? "" : ", inactive"}</span></p>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Run, minor units</span><input name="run_cost_minor" inputMode="numeric" defaultValue={own(f.run_cost_minor)} placeholder={String(s.furnace_run_cost_minor)} className={input} /></label>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Process gas per run</span><input name="gas_cost_minor" inputMode="numeric" defaultValue={own(f.gas_cost_minor)} placeholder={String(s.furnace_gas_cost_minor)} className={input} /></label>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Energy per run</span><input name="energy_cost_minor" inputMode="numeric" defaultValue={own(f.energy_cost_minor)} placeholder={String(s.furnace_energy_cost_minor)} className={input} /></label>
              <button type="submit" className="min-h-11 rounded-md border border-soot-300 px-3 py-2 text-sm font-semibold">Save {f.name}</button>
            </form>
          ))}
        </div>
      </section>
      <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-labelledby="mat-h">
        <h2 id="mat-h" className="font-display text-base font-semibold text-soot-900">Feedstock per material</h2>
        <div className="mt-2 space-y-3">
          {materials.map((m) => (
            <form key={m.id} onSubmit={(e) => saveMaterial(e, m.id)} className="grid items-end gap-2 border-t border-soot-100 pt-3 sm:grid-cols-5" aria-label={`Rates for ${m.code}`}>
              <p className="text-sm font-semibold sm:col-span-1">{m.code}{m.rates_set ? "" : <span className="block text-2xs font-normal text-brass-700">defaults</span>}</p>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Price, minor units per kg</span><input name="feedstock_minor_per_kg" inputMode="decimal" defaultValue={m.feedstock_minor_per_kg} className={input} /></label>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Printed share (infill), 0–1</span><input name="infill_fraction" inputMode="decimal" defaultValue={m.infill_fraction} className={input} /></label>
              <label className="block text-sm"><span className="block text-xs text-soot-600">Supports and raft share</span><input name="support_fraction" inputMode="decimal" defaultValue={m.support_fraction} className={input} /></label>
              <button type="submit" className="min-h-11 rounded-md border border-soot-300 px-3 py-2 text-sm font-semibold">Save {m.code}</button>
            </form>
          ))}
        </div>
      </section>
    </div>
  );
}
