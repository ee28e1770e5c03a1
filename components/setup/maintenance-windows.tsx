"use client";

import { ScrollRegion } from "@/components/ui/scroll-region";
import { useRouter } from "next/navigation";
import { useState } from "react";

type Window = { id: string; resource: string; resource_name: string; starts_at: string; ends_at: string; reason: string };
type Resource = { kind: "printer" | "wash_station" | "furnace"; id: string; name: string };
export type MaintenanceWindowsProps = { windows: Window[]; resources: Resource[]; timeZone: string };


export function MaintenanceWindows({ windows, resources, timeZone }: MaintenanceWindowsProps) {
  const fmt = (iso: string) => new Date(iso).toLocaleString("en-US", { dateStyle: "medium", timeStyle: "short", timeZone });
  const router = useRouter();
  const [resourceId, setResourceId] = useState(resources[0]?.id ?? "");
  const [start, setStart] = useState("");
  const [end, setEnd] = useState("");
  const [reason, setReason] = useState("");
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);

  async function add(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setMessage(null);
    const resource = resources.find((r) => r.id === resourceId);
    const res = await fetch("/api/maintenance-windows", {
      method: "POST",
      headers: { "content-type": "application/json" },
      body: JSON.stringify({ resource: resource?.kind, resource_id: resourceId, starts_at: start ? new Date(start).toISOString() : "", ends_at: end ? new Date(end).toISOString() : "", reason }),
    });
    const body = await res.json().catch(() => ({}));
    if (!res.ok) {
      setErrors(body.error?.fieldErrors ?? {});
      setMessage(body.error?.message ?? "Not saved.");
      return;
    }
    setReason("");
    router.refresh();
  }

  async function remove(id: string) {
    const res = await fetch(`/api/maintenance-windows/${id}`, { method: "DELETE" });
    if (!res.ok) setMessage((await res.json().catch(() => ({}))).error?.message ?? "Not removed.");
    router.refresh();
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-2.5 py-1.5 text-sm";
  return (
    <section className="rounded-card bg-white p-5 shadow-card" aria-label="Maintenance windows">
      <h2 className="font-display text-lg font-semibold">Maintenance windows</h2>
      <p className="mb-3 text-sm text-soot-500">The planner and the floor keep these times free. Times in the shop&apos;s zone ({timeZone}); the form takes this browser&apos;s local time.</p>
      <form onSubmit={add} className="mb-4 grid grid-cols-2 gap-3 md:grid-cols-5" noValidate>
        <label className="text-xs font-medium text-soot-600">
          Equipment
          <select className={input} value={resourceId} onChange={(e) => setResourceId(e.target.value)}>
            {resources.map((r) => (
              <option key={r.id} value={r.id}>
                {r.name} ({r.kind.replace("_", " ")})
              </option>
            ))}
          </select>
        </label>
        <label className="text-xs font-medium text-soot-600">
          Starts
          <input type="datetime-local" className={input} value={start} onChange={(e) => setStart(e.target.value)} />
          {errors.starts_at ? <span className="text-oxide-700">{errors.starts_at[0]}</span> : null}
        </label>
        <label className="text-xs font-medium text-soot-600">
          Ends
          <input type="datetime-local" className={input} value={end} onChange={(e) => setEnd(e.target.value)} />
          {errors.ends_at ? <span className="text-oxide-700">{errors.ends_at[0]}</span> : null}
        </label>
        <label className="text-xs font-medium text-soot-600">
          Reason
          <input className={input} value={reason} onChange={(e) => setReason(e.target.value)} />
        </label>
        <div className="flex items-end">
          <button type="submit" className="rounded-md bg-clay-600 px-3.5 py-1.5 text-sm font-semibold text-white hover:bg-clay-700">
            Block this time
          </button>
        </div>
      </form>
      {message ? <p role="alert" className="mb-3 text-sm text-oxide-700">{message}</p> : null}
      <ScrollRegion label="Maintenance windows"><table className="w-full text-sm">
        <thead>
          <tr className="border-b border-soot-200 text-left text-xs uppercase tracking-wide text-soot-500">
            <th className="px-2 py-1.5">Equipment</th>
            <th className="px-2 py-1.5">From</th>
            <th className="px-2 py-1.5">To</th>
            <th className="px-2 py-1.5">Reason</th>
            <th />
          </tr>
        </thead>
        <tbody>
          {windows.map((w) => (
            <tr key={w.id} className="border-b border-soot-100">
              <td className="px-2 py-1.5">{w.resource_name}</td>
              <td className="px-2 py-1.5 tabular">{fmt(w.starts_at)}</td>
              <td className="px-2 py-1.5 tabular">{fmt(w.ends_at)}</td>
              <td className="px-2 py-1.5">{w.reason || "—"}</td>
              <td className="px-2 py-1.5 text-right">
                <button type="button" onClick={() => remove(w.id)} className="text-sm text-oxide-700 hover:underline">
                  Remove
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table></ScrollRegion>
    </section>
  );
}
