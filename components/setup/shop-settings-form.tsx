"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

type Shift = { day: number; start: string; end: string };
export type ShopSettingsFormProps = {
  settings: {
    shop_name: string; time_zone: string; staffed_hours: Shift[]; drying_minutes: number; finishing_lead_minutes: number;
    at_risk_margin_minutes: number; plate_clearance_mm: number; tray_clearance_mm: number; version: number;
  };
};

const DAYS = ["Sunday", "Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday"];

export function ShopSettingsForm({ settings }: ShopSettingsFormProps) {
  const router = useRouter();
  const [v, setV] = useState(settings);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const set = <K extends keyof typeof v>(k: K, value: (typeof v)[K]) => setV((s) => ({ ...s, [k]: value }));
  const setShift = (i: number, patch: Partial<Shift>) => set("staffed_hours", v.staffed_hours.map((s, j) => (j === i ? { ...s, ...patch } : s)));

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setMessage(null);
    const res = await fetch("/api/shop-settings", { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ ...v, version: settings.version }) });
    const body = await res.json().catch(() => ({}));
    if (!res.ok) {
      setErrors(body.error?.fieldErrors ?? {});
      setMessage({ ok: false, text: body.error?.message ?? "Not saved." });
      return;
    }
    setMessage({ ok: true, text: "Saved." });
    router.refresh();
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-2.5 py-1.5 text-sm";
  const num = (k: "drying_minutes" | "finishing_lead_minutes" | "at_risk_margin_minutes" | "plate_clearance_mm" | "tray_clearance_mm", label: string, unit: string, hint: string) => (
    <label className="text-xs font-medium text-soot-600">
      {label} <span className="text-soot-500">({unit})</span>
      <input type="number" step="any" className={`${input} tabular text-right`} value={String(v[k])} onChange={(e) => set(k, e.target.value as unknown as number)} />
      {errors[k] ? <span className="text-oxide-700">{errors[k][0]}</span> : <span className="text-2xs text-soot-500">{hint}</span>}
    </label>
  );
  return (
    <form onSubmit={save} className="space-y-6" noValidate>
      <section className="grid grid-cols-2 gap-4 rounded-card bg-white p-5 shadow-card md:grid-cols-3">
        <label className="text-xs font-medium text-soot-600">
          Shop name
          <input className={input} value={v.shop_name} onChange={(e) => set("shop_name", e.target.value)} />
          {errors.shop_name ? <span className="text-oxide-700">{errors.shop_name[0]}</span> : null}
        </label>
        <label className="text-xs font-medium text-soot-600">
          Time zone
          <input className={input} value={v.time_zone} onChange={(e) => set("time_zone", e.target.value)} />
          {errors.time_zone ? <span className="text-oxide-700">{errors.time_zone[0]}</span> : <span className="text-2xs text-soot-500">IANA name; times are shown in it</span>}
        </label>
        {num("drying_minutes", "Drying after wash", "min", "before a brown part may go in a furnace")}
        {num("finishing_lead_minutes", "Finishing lead time", "min", "sintered to done, for projections; quote dates plan the machinists' queue and work instead")}
        {num("at_risk_margin_minutes", "At-risk margin", "min", "projected within this of the due date")}
        {num("plate_clearance_mm", "Build-plate clearance", "mm", "between parts and from the plate edge")}
        {num("tray_clearance_mm", "Tray clearance", "mm", "between parts and from the tray edge")}
      </section>
      <section className="rounded-card bg-white p-5 shadow-card" aria-label="Staffed hours">
        <h2 className="font-display text-lg font-semibold">Staffed hours</h2>
        <p className="mb-3 text-sm text-soot-500">Builds are started, washes loaded and furnaces loaded or unloaded only inside these shifts; printing and sintering run unattended. A shift that ends before it starts runs past midnight.</p>
        <div className="space-y-2">
          {v.staffed_hours.map((s, i) => (
            <div key={i} className="flex items-center gap-3 text-sm">
              <select aria-label="Day" className="rounded-md border border-soot-200 px-2 py-1" value={s.day} onChange={(e) => setShift(i, { day: Number(e.target.value) })}>
                {DAYS.map((d, n) => (
                  <option key={d} value={n}>
                    {d}
                  </option>
                ))}
              </select>
              <input aria-label="From" type="time" className="rounded-md border border-soot-200 px-2 py-1" value={s.start} onChange={(e) => setShift(i, { start: e.target.value })} />
              <span>to</span>
              <input aria-label="To" type="time" className="rounded-md border border-soot-200 px-2 py-1" value={s.end} onChange={(e) => setShift(i, { end: e.target.value })} />
              <button type="button" className="text-oxide-700 hover:underline" onClick={() => set("staffed_hours", v.staffed_hours.filter((_, j) => j !== i))}>
                Remove
              </button>
              {errors[`staffed_hours.${i}`] ? <span className="text-oxide-700">{errors[`staffed_hours.${i}`][0]}</span> : null}
            </div>
          ))}
        </div>
        <button type="button" className="mt-3 text-sm font-semibold text-clay-700 hover:underline" onClick={() => set("staffed_hours", [...v.staffed_hours, { day: 1, start: "06:00", end: "14:00" }])}>
          Add a shift
        </button>
      </section>
      <div className="flex items-center gap-3">
        <button type="submit" className="rounded-md bg-clay-600 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-700">
          Save settings
        </button>
        {message ? <span role={message.ok ? "status" : "alert"} className={message.ok ? "text-sm text-verdigris-700" : "text-sm text-oxide-700"}>{message.text}</span> : null}
      </div>
    </form>
  );
}
