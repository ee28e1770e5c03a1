// The floor's window JSON, kept for a moment per window and per change stamp. A request whose
// stamp differs from the cached one reloads; concurrent misses of one window share one load.
// The age limit covers the one gap a stamp cannot: a change whose stamp moved just before its
// transaction committed, read in between. While the live listener is up it closes that gap
// sooner: it clears the cache as soon as the committed change is announced (app/_server/live-hub.ts).

import type { WindowBody } from "./window-body";

type Entry<T> = { stamp: string; at: number; value: Promise<T>; refreshing?: boolean };

/** A key asked for lately and how to load it again (WindowCache.warm). */
type Recent<T> = { load: () => Promise<T>; usedAt: number };

export class WindowCache<T = string> {
  private entries = new Map<string, Entry<T>>();
  private recent = new Map<string, Recent<T>>();

  /**
   * refreshMs: for a value whose stamp still holds, past maxAgeMs (and up to refreshMs more) the
   * old value is answered while one load of the new runs behind it, so that requests do not wait
   * for a value that only aged (a changed stamp, or a clear, always waits for the new load).
   */
  constructor(
    private readonly maxAgeMs = 2_000,
    private readonly maxEntries = 200,
    private readonly now: () => number = Date.now,
    private readonly refreshMs = 0,
  ) {}

  async get(key: string, stamp: string, load: () => Promise<T>): Promise<T> {
    const hit = this.entries.get(key);
    const t = this.now();
    this.recent.delete(key);
    this.recent.set(key, { load, usedAt: t });
    if (this.recent.size > this.maxEntries) this.recent.delete(this.recent.keys().next().value!);
    if (hit && hit.stamp === stamp && t - hit.at <= this.maxAgeMs) return hit.value;
    if (hit && hit.stamp === stamp && t - hit.at <= this.maxAgeMs + this.refreshMs) {
      if (!hit.refreshing) {
        hit.refreshing = true;
        const next = load();
        next.then(
          () => {
            // Only if nothing replaced or cleared the entry meanwhile.
            if (this.entries.get(key) === hit) this.entries.set(key, { stamp, at: t, value: next });
          },
          () => {
            hit.refreshing = false;
          },
        );
      }
      return hit.value;
    }
    const value = load();
    this.entries.set(key, { stamp, at: t, value });
    // A failed load is not kept: the next request tries again.
    value.catch(() => {
      if (this.entries.get(key)?.value === value) this.entries.delete(key);
    });
    if (this.entries.size > this.maxEntries) {
      const oldest = this.entries.keys().next().value;
      if (oldest !== undefined) this.entries.delete(oldest);
    }
    return value;
  }

  /** After a change made by this process: the next request reloads whatever its stamp says. */
  clear(): void {
    this.entries.clear();
  }

  /**
   * Starts loading, under a stamp read after a change was announced, the keys last asked for
   * within withinMs (the most recent `most` of them) that are not loaded under it yet: the pages
   * that heard of the change ask again a little later (the announcement is grouped for 50 ms,
   * the page's refetch for 75 ms more) and find the load done or under way, rather than all
   * waiting for the first of them to start it. Returns how many loads it started.
   */
  warm(stamp: string, most: number, withinMs: number): number {
    const t = this.now();
    let started = 0;
    const keys = [...this.recent.entries()].reverse().filter(([, r]) => t - r.usedAt <= withinMs).sort((a, b) => b[1].usedAt - a[1].usedAt);
    for (const [key, r] of keys) {
      if (started >= most) break;
      const hit = this.entries.get(key);
      if (hit && hit.stamp === stamp) continue;
      // Not a use: a key only pages ask for stays warm.
      const usedAt = r.usedAt;
      this.get(key, stamp, r.load).catch(() => undefined);
      this.recent.set(key, { load: r.load, usedAt });
      started += 1;
    }
    return started;
  }

  get size(): number {
    return this.entries.size;
  }
}

// On globalThis: the web server's direct path (scripts/serve.ts) and the route handlers that
// Next.js bundled separately run in one process and must share one cache, so that a booking
// change clearing it is seen by both.
const globalForCache = globalThis as unknown as { hearthFloorCache?: WindowCache<WindowBody>; hearthSharedReadCache?: WindowCache<WindowBody> };

/** The process-wide cache of floor windows, as encoded response bodies. */
export function floorWindowCache(): WindowCache<WindowBody> {
  return (globalForCache.hearthFloorCache ??= new WindowCache<WindowBody>());
}

/**
 * The process-wide cache of the other shared reads that every open page asks for again after
 * each change it hears of (the unscheduled builds, a unit's trace; app/_server/shared-reads.ts):
 * keyed by the read and everything its answer depends on, cleared on every change announced.
 */
export function sharedReadCache(): WindowCache<WindowBody> {
  return (globalForCache.hearthSharedReadCache ??= new WindowCache<WindowBody>(2_000, 1_000));
}
