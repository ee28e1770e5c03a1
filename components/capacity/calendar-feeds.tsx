"use client";

import { useState } from "react";
import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { ApiError, getJson, sendJson } from "@/components/finishing/api";

// Calendar subscriptions per resource (iCalendar, RFC 5545). The address carries a secret that
// belongs to the signed-in person; it is shown once, and making a new one ends the old one.

type Status = { active: boolean; created_at: string | null; resources: Array<{ id: string; kind: string; name: string }> };
type Created = { token: string; created_at: string; feeds: Array<{ id: string; kind: string; name: string; url: string }> };

export function CalendarFeeds({ resources }: { resources: Array<{ id: string; kind: string; name: string }> }) {
  const qc = useQueryClient();
  const status = useQuery({ queryKey: ["calendar-token"], queryFn: () => getJson<Status>("/api/calendar/token") });
  const [created, setCreated] = useState<Created | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [copied, setCopied] = useState<string | null>(null);
  const rotate = useMutation({
    mutationFn: () => sendJson<Created>("/api/calendar/token", "POST"),
    onSuccess: (r) => {
      setCreated(r);
      setError(null);
      qc.invalidateQueries({ queryKey: ["calendar-token"] });
    },
    onError: (e) => setError(e instanceof ApiError ? e.message : "No new address was made."),
  });
  const revoke = useMutation({
    mutationFn: () => sendJson("/api/calendar/token", "DELETE"),
    onSuccess: () => {
      setCreated(null);
      qc.invalidateQueries({ queryKey: ["calendar-token"] });
    },
    onError: (e) => setError(e instanceof ApiError ? e.message : "The addresses were not revoked."),
  });
  const active = status.data?.active ?? false;

  return (
    <section className="rounded-card border border-soot-200 bg-white p-4 shadow-card" aria-label="Calendar feeds" data-testid="calendar-feeds">
      <h2 className="font-display text-lg font-semibold text-soot-900">Calendar feeds</h2>
      <p className="mt-1 text-xs text-soot-500">
        Subscribe to a printer, wash station or furnace in any calendar program that reads iCalendar addresses. The address works without signing in, so treat it like a
        password: it is shown once, and it stops working when you revoke it or make a new one.
      </p>
      <div className="mt-3 flex flex-wrap items-center gap-2 text-sm">
        <span data-testid="calendar-status">
          {status.isPending ? "…" : active ? `Your feed addresses are live (made ${status.data?.created_at ? new Date(status.data.created_at).toLocaleDateString() : ""}).` : "You have no feed addresses."}
        </span>
        <button type="button" onClick={() => rotate.mutate()} disabled={rotate.isPending} className="rounded-md bg-clay-600 px-3 py-1 text-sm font-semibold text-white hover:bg-clay-700 disabled:opacity-50">
          {active ? "Make new addresses" : "Make feed addresses"}
        </button>
        {active ? (
          <button type="button" onClick={() => revoke.mutate()} disabled={revoke.isPending} className="rounded-md border border-oxide-500/50 px-3 py-1 text-sm font-semibold text-oxide-700 hover:bg-oxide-100 disabled:opacity-50">
            Revoke
          </button>
        ) : null}
      </div>
      {error ? <p role="alert" className="mt-2 text-sm text-oxide-700">{error}</p> : null}
      {created ? (
        <ul className="mt-3 space-y-1 text-xs" data-testid="calendar-urls">
          {created.feeds.map((f) => (
            <li key={f.id} className="flex items-center gap-2">
              <span className="w-28 shrink-0 font-semibold text-soot-700">{f.name}</span>
              <code className="min-w-0 flex-1 truncate rounded bg-soot-50 px-1.5 py-0.5 text-soot-600" title={f.url}>{f.url}</code>
              <button
                type="button"
                className="text-clay-700 hover:underline"
                onClick={() => {
                  void navigator.clipboard?.writeText(f.url);
                  setCopied(f.id);
                }}
              >
                {copied === f.id ? "copied" : "copy"}
              </button>
            </li>
          ))}
        </ul>
      ) : active ? (
        <p className="mt-3 text-xs text-soot-500">
          Addresses for {resources.length} resources were shown when they were made. Lost them? Make new ones; the old ones stop working.
        </p>
      ) : null}
    </section>
  );
}
