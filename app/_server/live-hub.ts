// The web process's side of live updates: one LISTEN connection (db/live/listener.ts) fanned out
// to every open event stream of this process. Kept on globalThis, because the web server
// (scripts/serve.ts: start at boot, end the streams on SIGTERM) and the route handler that
// Next.js bundled separately (app/api/events/route.ts) load this module apart and must share it.
import { randomBytes } from "node:crypto";
import { getEnv } from "@/lib/env";
import { BOARD_ENTITIES, ChangeBatcher, FLOOR_ENTITIES, ReplayLog, parseChange, touchesWaitingWash, sseFrame, type Change } from "@/lib/live/changes";
import { floorWindowCache, sharedReadCache } from "@/lib/floor/window-cache";
import { boardCache, waitingWashCache, waitingWashRowsCache } from "@/lib/batches/board-cache";
import { ChangeListener, type ListenerState } from "@/db/live/listener";
import { getDb } from "@/db/client";
import { viewersAndStamps } from "@/db/live/stamps";

/** Browsers wait this long before reconnecting a dropped stream. */
export const RETRY_MS = 2_000;
/** A comment line this often keeps proxies and the browser from taking the stream for dead. */
export const HEARTBEAT_MS = 15_000;
/**
 * A stream ends after this long and the browser reconnects: each reconnect passes the sign-in
 * check again (a deactivated user stops hearing) and slides the session's idle lifetime.
 */
export const MAX_STREAM_MS = 5 * 60_000;
/** A client this far behind (bytes queued) is cut off rather than buffered without end. */
const MAX_QUEUED_BYTES = 256 * 1024;

type Stream = { send: (frame: string) => void; close: () => void; openedAt: number };

const encoder = new TextEncoder();

/**
 * How long after an announcement the caches that forgot start loading again (a proposal's forty
 * announcements arrive within a few milliseconds: one load, not forty), and which of their keys:
 * the floor windows and the board asked for within the last minute, at most a few of them. The
 * pages hear of the change only when the group is sent (ChangeBatcher, 50 ms) and group their
 * refetches for 75 ms more, so the loads they ask for are done or under way by then.
 */
const WARM_AFTER_MS = 5;
const WARM_WITHIN_MS = 60_000;
const WARM_FLOOR_WINDOWS = 4;

type Forgotten = { floor: boolean; board: boolean };

function forget(change: Change, forgotten: Forgotten): void {
  if (FLOOR_ENTITIES.has(change.e)) {
    floorWindowCache().clear();
    forgotten.floor = true;
  }
  if (BOARD_ENTITIES.has(change.e)) {
    boardCache().clear();
    forgotten.board = true;
  }
  // The unscheduled builds and the units' traces show a bit of everything announced.
  sharedReadCache().clear();
  // The units waiting for a wash: not when a booked wash batch only moves (db/batches/reads.ts).
  if (touchesWaitingWash(change)) {
    waitingWashRowsCache().clear();
    waitingWashCache().clear();
  }
}

export class LiveHub {
  private streams = new Set<Stream>();
  private listener: ChangeListener | null = null;
  private readonly log = new ReplayLog(randomBytes(4).toString("hex"));
  private readonly batcher = new ChangeBatcher((changes) => this.publish(changes));
  private heartbeat: ReturnType<typeof setInterval> | null = null;
  private closing = false;
  private forgotten: Forgotten = { floor: false, board: false };
  private warmTimer: ReturnType<typeof setTimeout> | null = null;
  stats = { opened: 0, groups: 0, notifications: 0, dropped_slow: 0, warmed: 0 };

  /** Starts listening (once); the floor's window cache forgets on every floor change from now on. */
  start(connectionString = getEnv().DATABASE_URL): void {
    if (this.listener || this.closing) return;
    this.listener = new ChangeListener({
      connectionString,
      onPayload: (payload) => {
        this.stats.notifications += 1;
        const change = parseChange(payload);
        if (!change) return;
        // At once, before any page hears of it: a refetch that follows must not get the old
        // window or board back from this process's caches.
        forget(change, this.forgotten);
        this.scheduleWarm();
        this.batcher.push(change);
      },
      onState: (state, { resumed, error }) => {
        if (state === "down") console.warn(`[live] listen connection down: ${error}`);
        // Whatever was announced while the connection was down is lost: everyone refetches.
        if (resumed) this.resync();
      },
    });
    this.listener.start();
    this.heartbeat = setInterval(() => this.beat(), HEARTBEAT_MS);
    this.heartbeat.unref?.();
  }

  private scheduleWarm(): void {
    if (this.warmTimer || this.closing) return;
    this.warmTimer = setTimeout(() => {
      this.warmTimer = null;
      const { floor, board } = this.forgotten;
      this.forgotten = { floor: false, board: false };
      // The stamps are read now, after the commit that was announced: a load under them shows it.
      viewersAndStamps(getDb(), [])
        .then(({ stamps }) => {
          if (floor) this.stats.warmed += floorWindowCache().warm(stamps.floor, WARM_FLOOR_WINDOWS, WARM_WITHIN_MS);
          if (board) this.stats.warmed += boardCache().warm(stamps.board, 1, WARM_WITHIN_MS);
        })
        // Only a head start: the pages' own requests load what is still missing.
        .catch(() => undefined);
    }, WARM_AFTER_MS);
    this.warmTimer.unref?.();
  }

  get listenerState(): ListenerState | "off" {
    return this.listener?.state ?? "off";
  }

  get openStreams(): number {
    return this.streams.size;
  }

  detail() {
    return {
      listening: this.listenerState,
      open_streams: this.streams.size,
      reconnects: this.listener?.reconnects ?? 0,
      last_error: this.listener?.lastError ?? null,
      ...this.stats,
    };
  }

  private publish(changes: Change[]): void {
    this.stats.groups += 1;
    const data = JSON.stringify({ changes });
    let frame = "";
    this.log.append((id) => (frame = sseFrame({ id, event: "change", data })));
    this.broadcast(frame);
  }

  private resync(): void {
    floorWindowCache().clear();
    boardCache().clear();
    waitingWashRowsCache().clear();
    waitingWashCache().clear();
    sharedReadCache().clear();
    this.broadcast(sseFrame({ id: this.log.lastId, event: "resync", data: "{}" }));
  }

  private beat(): void {
    const now = Date.now();
    for (const s of [...this.streams]) {
      if (now - s.openedAt >= MAX_STREAM_MS) s.close();
      else s.send(sseFrame({ comment: "beat" }));
    }
  }

  private broadcast(frame: string): void {
    for (const s of [...this.streams]) s.send(frame);
  }

  /**
   * A new stream: retry hint, then what this client missed since lastEventId (or a resync when
   * that cannot be known), then every change from now on. Ends on abort, on shutdown, or after
   * MAX_STREAM_MS.
   */
  open(signal: AbortSignal, lastEventId: string | null): ReadableStream<Uint8Array> {
    let stream: Stream | null = null;
    const hub = this.self();
    return new ReadableStream<Uint8Array>({
      start(controller) {
        let closed = false;
        const close = () => {
          if (closed) return;
          closed = true;
          hub.streams.delete(s);
          signal.removeEventListener("abort", close);
          try {
            controller.close();
          } catch {
            /* already errored or closed by the reader */
          }
        };
        const send = (frame: string) => {
          if (closed) return;
          if ((controller.desiredSize ?? 0) < -MAX_QUEUED_BYTES) {
            hub.stats.dropped_slow += 1;
            close();
            return;
          }
          try {
            controller.enqueue(encoder.encode(frame));
          } catch {
            close();
          }
        };
        const s: Stream = { send, close, openedAt: Date.now() };
        stream = s;
        if (hub.closing || signal.aborted) {
          closed = true;
          controller.close();
          return;
        }
        hub.streams.add(s);
        hub.stats.opened += 1;
        signal.addEventListener("abort", close);
        const replay = lastEventId ? hub.log.since(lastEventId) : [];
        let head = sseFrame({ retryMs: RETRY_MS, comment: "hearth live" });
        if (replay === null) head += sseFrame({ id: hub.log.lastId, event: "resync", data: "{}" });
        else head += replay.join("");
        // Names the stream's position even before the first change, for the next Last-Event-ID.
        if (!lastEventId || replay === null) head += sseFrame({ id: hub.log.lastId, event: "ready", data: JSON.stringify({ listening: hub.listenerState === "listening" }) });
        send(head);
      },
      cancel() {
        stream?.close();
      },
    }, { highWaterMark: MAX_QUEUED_BYTES, size: (chunk) => chunk.byteLength });
  }

  private self(): LiveHub {
    return this;
  }

  /** Ends every open stream and stops listening (the web server's graceful stop). */
  async shutdown(): Promise<void> {
    this.closing = true;
    this.batcher.drain();
    for (const s of [...this.streams]) s.close();
    if (this.heartbeat) clearInterval(this.heartbeat);
    this.heartbeat = null;
    if (this.warmTimer) clearTimeout(this.warmTimer);
    this.warmTimer = null;
    const l = this.listener;
    this.listener = null;
    this.batcher.cancel();
    await l?.stop();
  }
}

const globalForLive = globalThis as unknown as { hearthLiveHub?: LiveHub };

/** The process-wide hub. */
export function liveHub(): LiveHub {
  return (globalForLive.hearthLiveHub ??= new LiveHub());
}
