"use client";

import { useMemo, useState } from "react";
import { QueryClient, QueryClientProvider, useQuery } from "@tanstack/react-query";

type Message = { id: string; received_at: string; from: string; to: string[]; subject: string; text: string; html: string; message_id: string | null; attachments?: { filename: string; content_type: string; size: number }[] };
type OutboxRow = {
  id: string;
  kind: string;
  recipient_email: string;
  subject: string;
  status: "pending" | "sent" | "failed";
  attempts: number;
  last_error: string | null;
  created_at: string;
  sent_at: string | null;
  next_attempt_at: string;
};
type MailResponse = {
  messages: Message[];
  capture_error: string | null;
  outbox: { pending: number; sent: number; failed: number; oldest_pending_at: string | null; last_error: string | null };
  outbox_recent: OutboxRow[];
};

async function fetchJson<T>(url: string): Promise<T> {
  const res = await fetch(url, { headers: { accept: "application/json" } });
  const body = await res.json().catch(() => null);
  if (!res.ok) throw new Error(body?.error?.message ?? `The server answered ${res.status}.`);
  return body as T;
}

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "short" }) : "—");

const STATUS_STYLE: Record<OutboxRow["status"], string> = {
  pending: "bg-brass-100 text-brass-600",
  sent: "bg-verdigris-100 text-verdigris-700",
  failed: "bg-oxide-100 text-oxide-700",
};

export function MailViewer() {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { staleTime: 3_000, refetchOnWindowFocus: true } } }));
  return (
    <QueryClientProvider client={client}>
      <MailViewerInner />
    </QueryClientProvider>
  );
}

function MailViewerInner() {
  const [to, setTo] = useState("");
  const [filter, setFilter] = useState("");
  const [selected, setSelected] = useState<string | null>(null);
  const [view, setView] = useState<"text" | "html">("html");
  const mail = useQuery({
    queryKey: ["mail", filter],
    queryFn: () => fetchJson<MailResponse>(`/api/mail${filter ? `?to=${encodeURIComponent(filter)}` : ""}`),
    refetchInterval: 5_000,
  });
  const messages = useMemo(() => mail.data?.messages ?? [], [mail.data]);
  const current = messages.find((m) => m.id === selected) ?? messages[0] ?? null;

  return (
    <div className="space-y-5">
      {mail.data ? <OutboxSummary data={mail.data} /> : null}

      <form
        className="flex flex-wrap items-end gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          setFilter(to.trim());
          setSelected(null);
        }}
      >
        <label className="text-xs font-semibold text-soot-600">
          Recipient
          <input
            type="email"
            value={to}
            onChange={(e) => setTo(e.target.value)}
            placeholder="someone@shop.example"
            className="mt-1 block w-72 rounded-md border border-soot-200 bg-white px-2.5 py-1.5 text-sm font-normal focus:border-clay-500 focus:outline-none"
          />
        </label>
        <button type="submit" className="rounded-md bg-clay-600 px-3.5 py-2 text-sm font-semibold text-white hover:bg-clay-700">
          Show
        </button>
        {filter ? (
          <button
            type="button"
            onClick={() => {
              setTo("");
              setFilter("");
            }}
            className="rounded-md border border-soot-200 bg-white px-3 py-2 text-sm font-semibold text-soot-700 hover:bg-soot-50"
          >
            Everyone
          </button>
        ) : null}
      </form>

      {mail.isPending ? <p className="text-sm text-soot-500">Loading the mail…</p> : null}
      {mail.isError ? (
        <p role="alert" className="rounded-card border border-oxide-500/40 bg-oxide-100 px-4 py-3 text-sm text-oxide-700">
          Could not load the mail: {mail.error.message}
        </p>
      ) : null}
      {mail.data?.capture_error ? (
        <p role="status" className="rounded-card border border-brass-400/50 bg-brass-100 px-4 py-3 text-sm text-brass-600">
          {mail.data.capture_error}
        </p>
      ) : null}

      {mail.data ? (
        <div className="grid grid-cols-1 gap-4 lg:grid-cols-[minmax(18rem,26rem)_1fr]">
          <ul className="max-h-[36rem] divide-y divide-soot-100 overflow-y-auto rounded-card border border-soot-200 bg-white shadow-card" data-testid="mail-list">
            {messages.length === 0 ? (
              <li className="px-4 py-6 text-center text-sm text-soot-500">No messages{filter ? ` to ${filter}` : ""} yet.</li>
            ) : (
              messages.map((m) => (
                <li key={m.id}>
                  <button
                    type="button"
                    onClick={() => setSelected(m.id)}
                    aria-current={current?.id === m.id}
                    className={`block w-full px-4 py-2.5 text-left hover:bg-clay-50 ${current?.id === m.id ? "bg-clay-50" : ""}`}
                  >
                    <div className="truncate text-sm font-semibold text-soot-900">{m.subject || "(no subject)"}</div>
                    <div className="flex justify-between gap-2 text-xs text-soot-500">
                      <span className="truncate">{m.to.join(", ")}</span>
                      <span className="shrink-0">{when(m.received_at)}</span>
                    </div>
                  </button>
                </li>
              ))
            )}
          </ul>
          {current ? (
            <article className="min-w-0 rounded-card border border-soot-200 bg-white shadow-card" data-testid="mail-message">
              <header className="border-b border-soot-200 px-5 py-4">
                <h2 className="font-display text-lg font-semibold text-soot-900">{current.subject || "(no subject)"}</h2>
                <dl className="mt-2 grid grid-cols-[5rem_1fr] gap-x-3 gap-y-0.5 text-xs text-soot-600">
                  <dt className="text-soot-500">From</dt>
                  <dd>{current.from}</dd>
                  <dt className="text-soot-500">To</dt>
                  <dd>{current.to.join(", ")}</dd>
                  <dt className="text-soot-500">Received</dt>
                  <dd>{when(current.received_at)}</dd>
                  <dt className="text-soot-500">Message-ID</dt>
                  <dd className="break-all font-mono">{current.message_id ?? "—"}</dd>
                  {current.attachments?.length ? (
                    <>
                      <dt className="text-soot-500">Attached</dt>
                      <dd data-testid="mail-attachments">{current.attachments.map((a) => `${a.filename} (${a.content_type}, ${Math.ceil(a.size / 1024)} KB)`).join(", ")}</dd>
                    </>
                  ) : null}
                </dl>
                <div className="mt-3 inline-flex rounded-md border border-soot-200 text-xs font-semibold" role="group" aria-label="Show as">
                  {(["html", "text"] as const).map((v) => (
                    <button
                      key={v}
                      type="button"
                      aria-pressed={view === v}
                      onClick={() => setView(v)}
                      className={`px-3 py-1 ${view === v ? "bg-soot-800 text-white" : "bg-white text-soot-700 hover:bg-soot-50"} ${v === "html" ? "rounded-l-md" : "rounded-r-md"}`}
                    >
                      {v === "html" ? "HTML" : "Plain text"}
                    </button>
                  ))}
                </div>
              </header>
              {view === "html" && current.html ? (
                // No scripts, no same-origin: a captured message cannot reach the app.
                <iframe title={`Message: ${current.subject}`} sandbox="" srcDoc={current.html} className="h-[30rem] w-full rounded-b-card bg-white" />
              ) : (
                <pre className="max-h-[30rem] overflow-auto whitespace-pre-wrap px-5 py-4 font-mono text-xs text-soot-800">{current.text}</pre>
              )}
            </article>
          ) : null}
        </div>
      ) : null}

      {mail.data && mail.data.outbox_recent.length ? (
        <section className="space-y-2">
          <h2 className="font-display text-lg font-semibold text-soot-900">Outbox</h2>
          <div className="overflow-x-auto rounded-card border border-soot-200 bg-white shadow-card" role="region" aria-label="Outbox" tabIndex={0}>
            <table className="min-w-full text-xs" data-testid="outbox-table">
              <thead className="border-b border-soot-200 bg-soot-50 text-left uppercase tracking-wide text-soot-500">
                <tr>
                  <th className="px-4 py-2 font-semibold">Written</th>
                  <th className="px-4 py-2 font-semibold">Kind</th>
                  <th className="px-4 py-2 font-semibold">To</th>
                  <th className="px-4 py-2 font-semibold">Subject</th>
                  <th className="px-4 py-2 font-semibold">Status</th>
                  <th className="px-4 py-2 text-right font-semibold">Tries</th>
                  <th className="px-4 py-2 font-semibold">Next try / sent</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-soot-100">
                {mail.data.outbox_recent.map((r) => (
                  <tr key={r.id}>
                    <td className="whitespace-nowrap px-4 py-1.5">{when(r.created_at)}</td>
                    <td className="px-4 py-1.5 font-mono">{r.kind}</td>
                    <td className="px-4 py-1.5">{r.recipient_email}</td>
                    <td className="max-w-md truncate px-4 py-1.5" title={r.subject}>{r.subject}</td>
                    <td className="px-4 py-1.5">
                      <span className={`rounded px-1.5 py-0.5 font-semibold ${STATUS_STYLE[r.status]}`} title={r.last_error ?? undefined}>
                        {r.status}
                      </span>
                    </td>
                    <td className="tabular px-4 py-1.5 text-right">{r.attempts}</td>
                    <td className="whitespace-nowrap px-4 py-1.5">{r.status === "sent" ? when(r.sent_at) : r.status === "pending" ? when(r.next_attempt_at) : "—"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}
    </div>
  );
}

function OutboxSummary({ data }: { data: MailResponse }) {
  const { pending, sent, failed, oldest_pending_at, last_error } = data.outbox;
  const tiles = [
    { label: "Sent", value: sent, tone: "text-soot-900" },
    { label: "Waiting to send", value: pending, tone: pending ? "text-brass-600" : "text-soot-900" },
    { label: "Failed", value: failed, tone: failed ? "text-oxide-700" : "text-soot-900" },
  ];
  return (
    <div className="space-y-2">
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-3" data-testid="outbox-summary">
        {tiles.map((t) => (
          <div key={t.label} className="rounded-card border border-soot-200 bg-white px-4 py-3 shadow-card">
            <div className="text-xs font-semibold uppercase tracking-wide text-soot-500">{t.label}</div>
            <div className={`tabular font-display text-2xl font-semibold ${t.tone}`}>{t.value}</div>
          </div>
        ))}
      </div>
      {pending ? (
        <p role="status" className="text-xs text-brass-600">
          The oldest waiting message was written {when(oldest_pending_at)}.{last_error ? ` Last error from the relay: ${last_error}` : ""} Messages go out by themselves when the relay answers again.
        </p>
      ) : null}
    </div>
  );
}
