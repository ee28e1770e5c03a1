"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { RETENTION_CHOICES, retentionLabel } from "@/lib/activity/schemas";

export type RetentionFormProps = { retentionDays: number | null };

/** The admin's choice of how long the activity log keeps its events: a list of sensible spans, or for ever. */
export function RetentionForm({ retentionDays }: RetentionFormProps) {
  const router = useRouter();
  const [value, setValue] = useState(retentionDays === null ? "forever" : String(retentionDays));
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const choices: number[] = [...RETENTION_CHOICES];
  if (retentionDays !== null && !choices.includes(retentionDays)) choices.push(retentionDays);

  async function save(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setMessage(null);
    const retention_days = value === "forever" ? null : Number(value);
    const res = await fetch("/api/activity/retention", { method: "PUT", headers: { "content-type": "application/json" }, body: JSON.stringify({ retention_days }) });
    const body = await res.json().catch(() => ({}));
    setBusy(false);
    if (!res.ok) {
      setMessage({ ok: false, text: body.error?.fieldErrors?.retention_days?.[0] ?? body.error?.message ?? "Not saved." });
      return;
    }
    setMessage({ ok: true, text: `Saved: events are ${retentionLabel(body.retention_days)}.` });
    router.refresh();
  }

  return (
    <form onSubmit={save} className="flex flex-wrap items-end gap-2" aria-label="Activity log retention">
      <label className="text-sm font-medium text-soot-700">
        Keep events
        <select value={value} onChange={(e) => setValue(e.target.value)} className="mt-1 block min-h-11 rounded-md border border-soot-200 bg-white px-2.5 py-2 text-sm">
          {choices.sort((a, b) => a - b).map((d) => (
            <option key={d} value={String(d)}>
              {retentionLabel(d).replace(/^kept /, "")}
            </option>
          ))}
          <option value="forever">for ever</option>
        </select>
      </label>
      <button type="submit" disabled={busy} className="min-h-11 rounded-md border border-soot-200 bg-white px-3.5 py-2 text-sm font-semibold text-soot-800 hover:bg-soot-50 disabled:opacity-60">
        Save
      </button>
      {message ? (
        <p role="status" className={`w-full text-sm ${message.ok ? "text-soot-700" : "text-oxide-700"}`}>
          {message.text}
        </p>
      ) : null}
    </form>
  );
}
