"use client";

import { useState } from "react";
import { QueryClient, QueryClientProvider, useQuery } from "@tanstack/react-query";
import { getJson } from "@/lib/http/client";
import { Notice } from "@/components/ui/notice";
import { Bar, BarChart, CartesianGrid, Legend, ResponsiveContainer, Tooltip, XAxis, YAxis } from "recharts";
import { ScrollRegion } from "@/components/ui/scroll-region";

type QueueStat = { queue: string; waiting: number; scheduled: number; active: number; failed: number; oldest_waiting_s: number | null };
type FailedJob = {
  id: string;
  queue: string;
  data: unknown;
  error: string | null;
  retry_count: number;
  retry_limit: number;
  created_on: string;
  started_on: string | null;
  failed_on: string | null;
  singleton_key: string | null;
  archived: boolean;
};
type Sweep = { worker_id: string; started_at: string; finished_at: string | null; advanced: number; rescaled: number; mail_sent: number; error: string | null };
type JobsResponse = { installed: boolean; queues: QueueStat[]; failed: FailedJob[]; last_sweep: Sweep | null; sweeps: Sweep[] };

// What each queue is for, in the shop's words.
const QUEUE_HINTS: Record<string, string> = {
  "advance-booking": "moves units on at a booking's end",
  "send-mail": "sends one outbox message",
  "recompute-scale-up": "recomputes green sizes after a part or material change",
  "analyse-geometry": "measures an uploaded STL",
  "deliver-webhook": "POSTs one webhook delivery, retried with growing waits",
  heartbeat: "proves a worker is polling",
};

const when = (iso: string | null) => (iso ? new Date(iso).toLocaleString(undefined, { dateStyle: "medium", timeStyle: "medium" }) : "—");

function ago(iso: string | null, now: number): string {
  if (!iso) return "never";
  const s = Math.max(0, Math.round((now - new Date(iso).getTime()) / 1000));
  return s < 90 ? `${s} s ago` : s < 5400 ? `${Math.round(s / 60)} min ago` : `${Math.round(s / 3600)} h ago`;
}

function waited(s: number | null) {
  if (s === null) return "—";
  return s < 90 ? `${s} s` : s < 5400 ? `${Math.round(s / 60)} min` : `${(s / 3600).toFixed(1)} h`;
}

export function JobsBoard() {
  const [client] = useState(() => new QueryClient({ defaultOptions: { queries: { staleTime: 5_000, refetchOnWindowFocus: true } } }));
  return (
    <QueryClientProvider client={client}>
      <JobsBoardInner />
    </QueryClientProvider>
  );
}

function JobsBoardInner() {
  const [queue, setQueue] = useState("");
  const [open, setOpen] = useState<string | null>(null);
  const jobs = useQuery({
    queryKey: ["jobs", queue],
    queryFn: () => getJson<JobsResponse>(`/api/jobs${queue ? `?queue=${encodeURIComponent(queue)}` : ""}`),
    refetchInterval: 10_000,
  });

  if (jobs.isPending) return <p className="text-sm text-soot-500">Loading the queues…</p>;
  if (jobs.isError) return <Notice tone="danger">Could not load the queues: {jobs.error.message}</Notice>;
  const { queues, failed, last_sweep, sweeps, installed } = jobs.data;
  // Ages are reckoned from when the data arrived; it refreshes every ten seconds.
  const now = jobs.dataUpdatedAt;
  const sweepAge = last_sweep?.finished_at ? (now - new Date(last_sweep.finished_at).getTime()) / 1000 : null;
  const sweepStale = sweepAge === null || sweepAge > 300;

  return (
    <div className="space-y-6">
      {!installed ? (
        <p role="status" className="rounded-card border border-brass-400/50 bg-brass-100 px-4 py-3 text-sm text-brass-600">
          No worker has started on this database yet, so there are no queues. Start one with <code className="font-mono">npm run worker</code> (npm start runs one).
        </p>
      ) : null}

      <section className="grid grid-cols-1 gap-4 lg:grid-cols-3">
        <div className="rounded-card border border-soot-200 bg-white p-5 shadow-card" data-testid="last-sweep">
          <h2 className="text-xs font-semibold uppercase tracking-wide text-soot-500">Last sweep</h2>
          <p className={`mt-1 font-display text-2xl font-semibold ${sweepStale ? "text-oxide-700" : "text-soot-900"}`}>{ago(last_sweep?.finished_at ?? null, now)}</p>
          {last_sweep ? (
            <p className="mt-1 text-sm text-soot-600">
              {last_sweep.advanced} booking{last_sweep.advanced === 1 ? "" : "s"} advanced, {last_sweep.rescaled} scale-up{last_sweep.rescaled === 1 ? "" : "s"} recomputed, {last_sweep.mail_sent} message{last_sweep.mail_sent === 1 ? "" : "s"} sent
              <span className="block text-xs text-soot-500">by {last_sweep.worker_id}</span>
            </p>
          ) : (
            <p className="mt-1 text-sm text-soot-600">No sweep recorded yet.</p>
          )}
          {sweepStale && last_sweep ? <p className="mt-2 text-xs font-semibold text-oxide-700">Over five minutes ago: is a worker running?</p> : null}
          {last_sweep?.error ? <p className="mt-2 text-xs text-oxide-700">Errors: {last_sweep.error}</p> : null}
        </div>
        <div className="rounded-card border border-soot-200 bg-white p-5 shadow-card lg:col-span-2">
          <h2 className="text-xs font-semibold uppercase tracking-wide text-soot-500">Jobs per queue</h2>
          {queues.every((q) => q.waiting + q.active + q.scheduled + q.failed === 0) ? (
            <p className="mt-1 text-sm text-soot-600">Nothing waiting, running, scheduled or failed: every queue is empty.</p>
          ) : null}
          <div className="mt-2 h-44" aria-label="Jobs per queue by state" role="img">
            <ResponsiveContainer width="100%" height="100%">
              <BarChart data={queues} layout="vertical" margin={{ left: 24, right: 12, top: 4, bottom: 4 }}>
                <CartesianGrid strokeDasharray="3 3" stroke="#e9e6e1" />
                <XAxis type="number" allowDecimals={false} tick={{ fontSize: 11 }} />
                <YAxis type="category" dataKey="queue" width={130} tick={{ fontSize: 11 }} />
                <Tooltip />
                <Legend wrapperStyle={{ fontSize: 11 }} />
                <Bar dataKey="waiting" stackId="a" fill="#d07d4f" name="waiting" />
                <Bar dataKey="active" stackId="a" fill="#2f8a72" name="running" />
                <Bar dataKey="scheduled" stackId="a" fill="#7d93ab" name="scheduled" />
                <Bar dataKey="failed" stackId="a" fill="#c0392b" name="failed" />
              </BarChart>
            </ResponsiveContainer>
          </div>
        </div>
      </section>

      <ScrollRegion label="Queues" className="rounded-card border border-soot-200 bg-white shadow-card">
        <table className="min-w-full text-sm" data-testid="queue-table">
          <thead className="border-b border-soot-200 bg-soot-50 text-left text-xs uppercase tracking-wide text-soot-500">
            <tr>
              <th className="px-4 py-2.5 font-semibold">Queue</th>
              <th className="px-4 py-2.5 text-right font-semibold">Waiting</th>
              <th className="px-4 py-2.5 text-right font-semibold">Running</th>
              <th className="px-4 py-2.5 text-right font-semibold">Scheduled</th>
              <th className="px-4 py-2.5 text-right font-semibold">Failed</th>
              <th className="px-4 py-2.5 text-right font-semibold">Longest wait</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-soot-100">
            {queues.map((q) => (
              <tr key={q.queue}>
                <td className="px-4 py-2">
                  <div className="font-mono text-xs font-semibold text-soot-800">{q.queue}</div>
                  <div className="text-xs text-soot-500">{QUEUE_HINTS[q.queue] ?? ""}</div>
                </td>
                <td className="tabular px-4 py-2 text-right">{q.waiting}</td>
                <td className="tabular px-4 py-2 text-right">{q.active}</td>
                <td className="tabular px-4 py-2 text-right">{q.scheduled}</td>
                <td className={`tabular px-4 py-2 text-right ${q.failed ? "font-semibold text-oxide-700" : ""}`}>{q.failed}</td>
                <td className="tabular px-4 py-2 text-right">{waited(q.oldest_waiting_s)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </ScrollRegion>

      <section className="space-y-3">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <h2 className="font-display text-lg font-semibold text-soot-900">Failed jobs</h2>
          <label className="text-xs font-semibold text-soot-600">
            Queue
            <select
              value={queue}
              onChange={(e) => setQueue(e.target.value)}
              className="ml-2 rounded-md border border-soot-200 bg-white px-2 py-1 text-sm font-normal"
            >
              <option value="">all queues</option>
              {queues.map((q) => (
                <option key={q.queue} value={q.queue}>
                  {q.queue}
                </option>
              ))}
            </select>
          </label>
        </div>
        <ScrollRegion label="Failed jobs" className="rounded-card border border-soot-200 bg-white shadow-card">
          <table className="min-w-full text-sm" data-testid="failed-jobs">
            <thead className="border-b border-soot-200 bg-soot-50 text-left text-xs uppercase tracking-wide text-soot-500">
              <tr>
                <th className="px-4 py-2.5 font-semibold">Failed</th>
                <th className="px-4 py-2.5 font-semibold">Queue</th>
                <th className="px-4 py-2.5 font-semibold">Error</th>
                <th className="px-4 py-2.5 text-right font-semibold">Tries</th>
                <th className="px-4 py-2.5 font-semibold">
                  <span className="sr-only">Payload</span>
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-soot-100">
              {failed.length === 0 ? (
                <tr>
                  <td colSpan={5} className="px-4 py-6 text-center text-soot-500">
                    No failed jobs{queue ? ` in ${queue}` : ""}. A job fails here only after its last retry.
                  </td>
                </tr>
              ) : (
                failed.flatMap((j) => [
                  <tr key={j.id}>
                    <td className="whitespace-nowrap px-4 py-2 text-xs text-soot-600">{when(j.failed_on ?? j.created_on)}</td>
                    <td className="px-4 py-2 font-mono text-xs">{j.queue}</td>
                    <td className="max-w-xl px-4 py-2 text-xs text-oxide-700">{j.error ?? "no message"}</td>
                    <td className="tabular px-4 py-2 text-right text-xs">
                      {j.retry_count + 1} / {j.retry_limit + 1}
                    </td>
                    <td className="px-4 py-2 text-right">
                      <button
                        type="button"
                        className="rounded-md border border-soot-200 bg-white px-2.5 py-1 text-xs font-semibold text-soot-700 hover:bg-soot-50"
                        aria-expanded={open === j.id}
                        onClick={() => setOpen(open === j.id ? null : j.id)}
                      >
                        {open === j.id ? "Hide" : "Payload"}
                      </button>
                    </td>
                  </tr>,
                  open === j.id ? (
                    <tr key={`${j.id}:payload`} className="bg-soot-50">
                      <td colSpan={5} className="px-4 py-3">
                        <dl className="grid grid-cols-[8rem_1fr] gap-x-3 gap-y-1 text-xs">
                          <dt className="text-soot-500">Job</dt>
                          <dd className="font-mono">{j.id}{j.archived ? " (archived)" : ""}</dd>
                          <dt className="text-soot-500">Sent</dt>
                          <dd>{when(j.created_on)}</dd>
                          <dt className="text-soot-500">Key</dt>
                          <dd className="font-mono">{j.singleton_key ?? "—"}</dd>
                          <dt className="text-soot-500">Payload</dt>
                          <dd>
                            <pre className="overflow-x-auto whitespace-pre-wrap font-mono text-2xs text-soot-800">{JSON.stringify(j.data, null, 2)}</pre>
                          </dd>
                        </dl>
                      </td>
                    </tr>
                  ) : null,
                ])
              )}
            </tbody>
          </table>
        </ScrollRegion>
      </section>

      <section className="space-y-2">
        <h2 className="font-display text-lg font-semibold text-soot-900">Recent sweeps</h2>
        <ScrollRegion label="Sweeps" className="rounded-card border border-soot-200 bg-white shadow-card">
          <table className="min-w-full text-xs" data-testid="sweeps">
            <thead className="border-b border-soot-200 bg-soot-50 text-left uppercase tracking-wide text-soot-500">
              <tr>
                <th className="px-4 py-2 font-semibold">Started</th>
                <th className="px-4 py-2 font-semibold">Worker</th>
                <th className="px-4 py-2 text-right font-semibold">Took</th>
                <th className="px-4 py-2 text-right font-semibold">Advanced</th>
                <th className="px-4 py-2 text-right font-semibold">Scale-ups</th>
                <th className="px-4 py-2 text-right font-semibold">Mail</th>
                <th className="px-4 py-2 font-semibold">Errors</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-soot-100">
              {sweeps.map((s) => (
                <tr key={`${s.worker_id}:${s.started_at}`}>
                  <td className="whitespace-nowrap px-4 py-1.5">{when(s.started_at)}</td>
                  <td className="px-4 py-1.5 font-mono text-2xs">{s.worker_id}</td>
                  <td className="tabular px-4 py-1.5 text-right">
                    {s.finished_at ? `${new Date(s.finished_at).getTime() - new Date(s.started_at).getTime()} ms` : "running"}
                  </td>
                  <td className="tabular px-4 py-1.5 text-right">{s.advanced}</td>
                  <td className="tabular px-4 py-1.5 text-right">{s.rescaled}</td>
                  <td className="tabular px-4 py-1.5 text-right">{s.mail_sent}</td>
                  <td className="px-4 py-1.5 text-oxide-700">{s.error ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </ScrollRegion>
      </section>
    </div>
  );
}
