"use client";

import { useRouter } from "next/navigation";
import { useState } from "react";
import { Notice } from "@/components/ui/notice";
import { ScrollRegion } from "@/components/ui/scroll-region";
import { AdminRecordRow, RowButton, when } from "./admin-record";

type Endpoint = { id: string; url: string; description: string; events: string[]; active: boolean; paused_at: string | null; failing_since: string | null; version: number; waiting: number; failed: number };
type Delivery = { id: string; endpoint_id: string; event_id: string; type: string; state: string; attempts: number; last_status: number | null; last_error: string | null; created_at: string; delivered_at: string | null };

export function WebhooksAdmin({ endpoints, deliveries, eventTypes }: { endpoints: Endpoint[]; deliveries: Delivery[]; eventTypes: string[] }) {
  const router = useRouter();
  const [url, setUrl] = useState("");
  const [description, setDescription] = useState("");
  const [events, setEvents] = useState<string[]>(["*"]);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [secret, setSecret] = useState<{ url: string; secret: string } | null>(null);

  async function call(path: string, method: string, body?: unknown) {
    const res = await fetch(path, { method, headers: { "content-type": "application/json" }, body: body === undefined ? undefined : JSON.stringify(body) });
    return { ok: res.ok, body: await res.json().catch(() => ({})) };
  }

  async function create(e: React.FormEvent) {
    e.preventDefault();
    setErrors({});
    setMessage(null);
    setSecret(null);
    const r = await call("/api/webhooks", "POST", { url, description, events });
    if (!r.ok) {
      setErrors(r.body.error?.fieldErrors ?? {});
      setMessage({ ok: false, text: r.body.error?.message ?? "Not registered." });
      return;
    }
    setSecret({ url: r.body.endpoint.url, secret: r.body.endpoint.secret });
    setUrl("");
    setDescription("");
    router.refresh();
  }

  async function act(label: string, path: string, method: string, body?: unknown) {
    const r = await call(path, method, body);
    setMessage(r.ok ? { ok: true, text: label } : { ok: false, text: r.body.error?.message ?? "Not done." });
    router.refresh();
  }

  const input = "mt-1 block w-full rounded-md border border-soot-200 px-2.5 py-2 text-sm";
  const err = (k: string) => (errors[k] ? <span className="block text-xs text-oxide-700">{errors[k][0]}</span> : null);
  const toggle = (t: string, on: boolean) => setEvents((p) => (on ? [...p.filter((x) => x !== (t === "*" ? "" : "*")), t] : p.filter((x) => x !== t)));

  return (
    <div className="space-y-6">
      {secret ? (
        <Notice tone="success" title={`Endpoint ${secret.url} registered`}>
          <p>Its signing secret, shown this once: verify each delivery&apos;s Hearth-Signature with it (README, Webhooks).</p>
          <code className="mt-2 block break-all rounded bg-white px-2 py-1.5 font-mono text-xs text-soot-900 select-all">{secret.secret}</code>
        </Notice>
      ) : null}
      {message ? <Notice tone={message.ok ? "success" : "danger"}>{message.text}</Notice> : null}

      <form onSubmit={create} noValidate className="space-y-4 rounded-card bg-white p-4 shadow-card sm:p-5" aria-label="New webhook endpoint">
        <h2 className="font-display text-lg font-semibold text-soot-900">New endpoint</h2>
        <div className="grid gap-4 sm:grid-cols-2">
          <label className="text-xs font-medium text-soot-600">
            Address (https://…)
            <input className={input} type="url" value={url} onChange={(e) => setUrl(e.target.value)} required />
            {err("url")}
          </label>
          <label className="text-xs font-medium text-soot-600">
            Description
            <input className={input} value={description} onChange={(e) => setDescription(e.target.value)} maxLength={200} />
            {err("description")}
          </label>
        </div>
        <fieldset>
          <legend className="text-xs font-medium text-soot-600">Events</legend>
          <div className="mt-1 grid gap-1 sm:grid-cols-3">
            {["*", ...eventTypes].map((t) => (
              <label key={t} className="flex min-h-11 items-center gap-2 text-sm">
                <input type="checkbox" className="h-4 w-4" checked={events.includes(t)} onChange={(e) => toggle(t, e.target.checked)} />
                <code className="text-xs">{t === "*" ? "every event" : t}</code>
              </label>
            ))}
          </div>
          {err("events")}
        </fieldset>
        <button type="submit" className="min-h-11 rounded-md bg-clay-700 px-4 py-2 text-sm font-semibold text-white hover:bg-clay-800">
          Register endpoint
        </button>
      </form>

      <section aria-label="Endpoints">
        <h2 className="font-display text-lg font-semibold text-soot-900">Endpoints</h2>
        {endpoints.length === 0 ? <p className="mt-2 text-sm text-soot-600">No endpoints yet.</p> : null}
        <ul className="mt-2 space-y-3">
          {endpoints.map((ep) => (
            <AdminRecordRow
              key={ep.id}
              testId="webhook-endpoint"
              title={
                <>
                  <code className="break-all text-sm text-soot-900">{ep.url}</code>{" "}
                  <span className="text-xs font-semibold text-soot-600">{ep.paused_at ? `paused ${when(ep.paused_at)}` : ep.active ? "active" : "off"}</span>
                  {ep.description ? <p className="text-xs text-soot-600">{ep.description}</p> : null}
                </>
              }
              actions={
                <>
                  {ep.paused_at ? <RowButton onClick={() => act("Resumed.", `/api/webhooks/${ep.id}`, "PATCH", { version: ep.version, resume: true })}>Resume</RowButton> : null}
                  <RowButton onClick={() => act(ep.active ? "Switched off." : "Switched on.", `/api/webhooks/${ep.id}`, "PATCH", { version: ep.version, active: !ep.active })}>
                    {ep.active ? "Switch off" : "Switch on"}
                  </RowButton>
                </>
              }
            >
              <p className="mt-1 text-xs text-soot-600">
                {ep.events.join(", ")} · {ep.waiting} waiting · {ep.failed} given up{ep.failing_since ? ` · failing since ${when(ep.failing_since)}` : ""}
              </p>
            </AdminRecordRow>
          ))}
        </ul>
      </section>

      <section aria-label="Recent deliveries">
        <h2 className="font-display text-lg font-semibold text-soot-900">Recent deliveries</h2>
        <ScrollRegion label="Recent deliveries, scrolls sideways" className="mt-2 rounded-card bg-white shadow-card">
          <table className="w-full min-w-[36rem] text-left text-sm">
            <thead className="text-xs text-soot-500">
              <tr><th className="p-2">When</th><th className="p-2">Event</th><th className="p-2">State</th><th className="p-2">Tries</th><th className="p-2">Answer</th><th className="p-2"><span className="sr-only">Actions</span></th></tr>
            </thead>
            <tbody>
              {deliveries.map((d) => (
                <tr key={d.id} className="border-t border-soot-100">
                  <td className="p-2 text-xs">{when(d.created_at)}</td>
                  <td className="p-2"><code className="text-xs">{d.type}</code></td>
                  <td className="p-2 text-xs">{d.state}</td>
                  <td className="tabular p-2 text-xs">{d.attempts}</td>
                  <td className="p-2 text-xs">{d.last_status ?? "—"}{d.last_error ? ` ${d.last_error.slice(0, 80)}` : ""}</td>
                  <td className="p-2">
                    {d.state !== "sending" ? (
                      <button type="button" className="min-h-11 text-xs font-semibold text-clay-700 hover:underline" onClick={() => act("Queued to send again.", `/api/webhook-deliveries/${d.id}/redeliver`, "POST")}>
                        Send again
                      </button>
                    ) : null}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollRegion>
      </section>
    </div>
  );
}
