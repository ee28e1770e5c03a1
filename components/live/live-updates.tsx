"use client";

import { useEffect, useSyncExternalStore } from "react";
import { useQueryClient, type Query, type QueryClient } from "@tanstack/react-query";
import type { Change } from "@/lib/live/changes";
import { liveStatus, subscribeLive, subscribeLiveStatus, type LiveStatus } from "./live-connection";
import { queryHears } from "./query-map";

/** How long the first change of a burst waits for the rest before its queries refetch. */
const COALESCE_MS = 75;

/**
 * Mounted once under a page's QueryClientProvider: refetches the page's queries that a change
 * touches. A query may say it is busy (meta.liveHold, e.g. while a booking is being dragged):
 * it is asked again shortly instead of being refetched under the user's hand.
 */
export function LiveUpdates() {
  const qc = useQueryClient();
  useEffect(() => {
    const held = new Map<Query, ReturnType<typeof setTimeout>>();
    // One refetch per query at a time, and one more after it when changes arrived meanwhile:
    // cancelling the one under way on every event would, in a burst, never let one finish.
    const running = new Map<Query, { again: boolean }>();
    const refetch = (query: Query) => {
      const hold = (query.meta as { liveHold?: () => boolean } | undefined)?.liveHold;
      if (hold?.()) {
        if (!held.has(query))
          held.set(query, setTimeout(() => {
            held.delete(query);
            refetch(query);
          }, 500));
        return;
      }
      const run = running.get(query);
      if (run) {
        run.again = true;
        return;
      }
      const state = { again: false };
      running.set(query, state);
      void (async () => {
        // A fetch already under way (a poll, a mutation's own refetch) began before this change.
        if (query.state.fetchStatus === "fetching") await query.promise?.catch(() => undefined);
        await qc.invalidateQueries({ queryKey: query.queryKey, exact: true }, { cancelRefetch: false }).catch(() => undefined);
        running.delete(query);
        if (state.again) refetch(query);
      })();
    };
    // Changes that arrive within COALESCE_MS of each other make one refetch per query, not one
    // each: a burst (a proposal applied, several people moving bookings) asks once.
    const due = new Set<Query>();
    let flush: ReturnType<typeof setTimeout> | null = null;
    const stop = subscribeLive((m) => {
      for (const query of matching(qc, m.kind === "resync" ? null : m.changes)) due.add(query);
      if (!due.size || flush) return;
      flush = setTimeout(() => {
        flush = null;
        const queries = [...due];
        due.clear();
        for (const query of queries) refetch(query);
      }, COALESCE_MS);
    });
    return () => {
      stop();
      if (flush) clearTimeout(flush);
      for (const t of held.values()) clearTimeout(t);
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
