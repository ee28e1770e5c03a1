"use client";

import { useEffect, useSyncExternalStore } from "react";
import { useQueryClient, type Query, type QueryClient } from "@tanstack/react-query";
import type { Change } from "@/lib/live/changes";
import { liveStatus, subscribeLive, subscribeLiveStatus, type LiveStatus } from "./live-connection";
import { queryHears } from "./query-map";

/**
 * Mounted once under a page's QueryClientProvider: refetches the page's queries that a change
 * touches. A query may say it is busy (meta.liveHold, e.g. while a booking is being dragged):
 * it is asked again shortly instead of being refetched under the user's hand.
 */
export function LiveUpdates() {
  const qc = useQueryClient();
  useEffect(() => {
    let held: { query: Query; timer: ReturnType<typeof setTimeout> }[] = [];
    const refetch = (query: Query) => {
      const hold = (query.meta as { liveHold?: () => boolean } | undefined)?.liveHold;
      if (hold?.()) {
        if (held.some((h) => h.query === query)) return;
        const entry = { query, timer: setTimeout(() => {
          held = held.filter((h) => h !== entry);
          refetch(query);
        }, 500) };
        held.push(entry);
        return;
      }
      void qc.invalidateQueries({ queryKey: query.queryKey, exact: true });
    };
    const stop = subscribeLive((m) => {
      for (const query of matching(qc, m.kind === "resync" ? null : m.changes)) refetch(query);
    });
    return () => {
      stop();
      for (const h of held) clearTimeout(h.timer);
    };
  }, [qc]);
  return null;
}

function matching(qc: QueryClient, changes: Change[] | null): Query[] {
  return qc.getQueryCache().findAll({ predicate: (q) => queryHears(q.queryKey, q.state.data, changes) });
}

export function useLiveStatus(): LiveStatus {
  return useSyncExternalStore(subscribeLiveStatus, liveStatus, () => "connecting");
}

/** The polling interval a query used before live updates, only while the stream is down. */
export function useLivePoll(): (ms: number) => number | false {
  const live = useLiveStatus() === "live";
  return (ms) => (live ? false : ms);
}

const LABEL: Record<LiveStatus, string> = { live: "Live", connecting: "Connecting…", reconnecting: "Reconnecting…" };
const TITLE: Record<LiveStatus, string> = {
  live: "Changes made by others show here within a second.",
  connecting: "Opening live updates; until then the page refreshes every few seconds.",
  reconnecting: "Live updates are down; the page refreshes every few seconds until they are back.",
};

/** A small dot and word: whether others' changes arrive live or by polling. */
export function LiveIndicator({ className = "" }: { className?: string }) {
  const status = useLiveStatus();
  return (
    <span
      role="status"
      data-testid="live-indicator"
      data-status={status}
      title={TITLE[status]}
      className={`inline-flex items-center gap-1.5 rounded-full border border-soot-200 bg-white px-2 py-0.5 text-xs text-soot-700 ${className}`}
    >
      <span aria-hidden className={`h-2 w-2 rounded-full ${status === "live" ? "bg-verdigris-500" : "bg-brass-400"}`} />
      {LABEL[status]}
    </span>
  );
}
