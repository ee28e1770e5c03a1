"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";

export type FieldDef =
  | { name: string; label: string; type: "text"; hint?: string }
  | { name: string; label: string; type: "number"; unit?: string; step?: string; hint?: string }
  | { name: string; label: string; type: "checkbox"; hint?: string }
  | { name: string; label: string; type: "select"; options: { value: string; label: string }[]; nullable?: boolean; hint?: string }
  | { name: string; label: string; type: "multi"; options: { value: string; label: string }[]; hint?: string };

export type RecordFormProps = {
  title: string;
  fields: FieldDef[];
  initial: Record<string, unknown>;
  endpoint: string;
  method: "POST" | "PATCH";
  version?: number;
  submitLabel: string;
  onDone?: () => void;
};

/**
 * One form for the set-up records: sends JSON to the API, shows each field's error beside it,
 * and keeps what the admin typed when the server refuses (422) or someone else saved first (409).
 */
export function RecordForm({ title, fields, initial, endpoint, method, version, submitLabel, onDone }: RecordFormProps) {
  const router = useRouter();
  const [values, setValues] = useState<Record<string, unknown>>(initial);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ tone: "error" | "ok"; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  const set = (name: string, value: unknown) => setValues((v) => ({ ...v, [name]: value }));

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setMessage(null);
    const body: Record<string, unknown> = {};
    for (const f of fields) body[f.name] = values[f.name];
    if (version !== undefined) body.version = version;
    try {
      const res = await fetch(endpoint, { method, headers: { "content-type": "application/json" }, body: JSON.stringify(body) });
      const json = await res.json().catch(() => ({}));
      if (!res.ok) {
        setErrors(json.error?.fieldErrors ?? {});
        setMessage({ tone: "error", text: json.error?.message ?? `The server answered ${res.status}.` });
        return;
      }
      setMessage({ tone: "ok", text: "Saved." });
      router.refresh();
      onDone?.();
    } catch {
      setMessage({ tone: "error", text: "The server did not answer; nothing was saved. Try again." });
    } finally {
      setBusy(false);
    }
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-2.5 py-1.5 text-sm focus:border-clay-500 focus:outline-none";
  return (
    <form onSubmit={submit} className="rounded-card border border-soot-200 bg-soot-50 p-4" aria-label={title} noValidate>
      <div className="mb-3 font-semibold text-soot-800">{title}</div>
      <div className="grid grid-cols-2 gap-x-4 gap-y-3 md:grid-cols-4">
        {fields.map((f) => {
          const err = errors[f.name]?.[0];
          const id = `${title}-${f.name}`.replace(/\W+/g, "-");
          return (
            <div key={f.name} className={f.type === "multi" ? "col-span-2 md:col-span-4" : ""}>
              {f.type === "checkbox" ? (
                <label className="mt-5 flex items-center gap-2 text-sm text-soot-700">
                  <input type="checkbox" checked={Boolean(values[f.name])} onChange={(e) => set(f.name, e.target.checked)} /> {f.label}
                </label>
              ) : f.type === "multi" ? (
                <fieldset>
                  <legend className="text-xs font-medium text-soot-600">{f.label}</legend>
                  <div className="mt-1 flex flex-wrap gap-3">
                    {f.options.map((o) => {
                      const list = (values[f.name] as string[]) ?? [];
                      return (
                        <label key={o.value} className="flex items-center gap-1.5 text-sm">
                          <input type="checkbox" checked={list.includes(o.value)} onChange={(e) => set(f.name, e.target.checked ? [...list, o.value] : list.filter((x) => x !== o.value))} />
                          {o.label}
                        </label>
                      );
                    })}
                  </div>
                </fieldset>
              ) : (
                <label htmlFor={id} className="block text-xs font-medium text-soot-600">
                  {f.label}
                  {f.type === "number" && f.unit ? <span className="text-soot-500"> ({f.unit})</span> : null}
                  {f.type === "select" ? (
                    <select id={id} className={input} value={(values[f.name] as string) ?? ""} onChange={(e) => set(f.name, e.target.value || null)}>
                      {f.nullable ? <option value="">— none —</option> : null}
                      {f.options.map((o) => (
                        <option key={o.value} value={o.value}>
                          {o.label}
                        </option>
                      ))}
                    </select>
                  ) : (
                    <input
                      id={id}
                      className={`${input} ${f.type === "number" ? "tabular text-right" : ""}`}
                      type={f.type === "number" ? "number" : "text"}
                      step={f.type === "number" ? (f.step ?? "any") : undefined}
                      value={values[f.name] === null || values[f.name] === undefined ? "" : String(values[f.name])}
                      onChange={(e) => set(f.name, f.type === "number" ? (e.target.value === "" ? null : e.target.value) : e.target.value)}
                      aria-invalid={!!err}
                    />
                  )}
                </label>
              )}
              {f.hint && !err ? <div className="mt-0.5 text-2xs text-soot-500">{f.hint}</div> : null}
              {err ? <div className="mt-0.5 text-xs text-oxide-700">{err}</div> : null}
            </div>
          );
        })}
      </div>
      <div className="mt-4 flex items-center gap-3">
        <button type="submit" disabled={busy} className="rounded-md bg-clay-600 px-3.5 py-1.5 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-60">
          {busy ? "Saving…" : submitLabel}
        </button>
        {onDone ? (
          <button type="button" onClick={onDone} className="text-sm text-soot-500 hover:text-soot-800">
            Close
          </button>
        ) : null}
        {message ? (
          <span role={message.tone === "error" ? "alert" : "status"} className={`text-sm ${message.tone === "error" ? "text-oxide-700" : "text-verdigris-700"}`}>
            {message.text}
          </span>
        ) : null}
      </div>
    </form>
  );
}
