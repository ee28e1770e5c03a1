// One event stream per browser tab (app/api/events), shared by every part of the page that
// wants to hear of changes. When it drops, it comes back with growing pauses and asks for what
// it missed (?lastEventId=); while it is down the pages poll as they used to.
import type { Change } from "@/lib/live/changes";

export const EVENTS_URL = "/api/events";

export type LiveStatus = "connecting" | "live" | "reconnecting";
export type LiveMessage = { kind: "change"; changes: Change[] } | { kind: "resync" };

const MIN_DELAY_MS = 1_000;
const MAX_DELAY_MS = 30_000;

let source: EventSource | null = null;
let users = 0;
let status: LiveStatus = "connecting";
let lastEventId: string | null = null;
let attempt = 0;
let timer: ReturnType<typeof setTimeout> | null = null;
const messageListeners = new Set<(m: LiveMessage) => void>();
const statusListeners = new Set<() => void>();

function setStatus(next: LiveStatus) {
  if (status === next) return;
  status = next;
  for (const l of statusListeners) l();
}

function emit(m: LiveMessage) {
  for (const l of messageListeners) l(m);
}

function open() {
  timer = null;
  if (users === 0 || typeof EventSource === "undefined") return;
  const es = new EventSource(lastEventId ? `${EVENTS_URL}?lastEventId=${encodeURIComponent(lastEventId)}` : EVENTS_URL);
  source = es;
  const remember = (ev: MessageEvent) => {
    if (ev.lastEventId) lastEventId = ev.lastEventId;
  };
  es.addEventListener("open", () => {
    attempt = 0;
    setStatus("live");
  });
  es.addEventListener("ready", remember);
  es.addEventListener("change", (ev) => {
    remember(ev);
    try {
      const { changes } = JSON.parse(ev.data) as { changes: Change[] };
      if (Array.isArray(changes)) emit({ kind: "change", changes });
    } catch {
      emit({ kind: "resync" });
    }
  });
  es.addEventListener("resync", (ev) => {
    remember(ev);
    emit({ kind: "resync" });
  });
  es.addEventListener("error", () => {
    // The browser's own retry would not back off (nor survive a 401); this one does.
    es.close();
    if (source === es) source = null;
    setStatus("reconnecting");
    schedule();
  });
}

function schedule() {
  if (timer || users === 0) return;
  const ceiling = Math.min(MAX_DELAY_MS, MIN_DELAY_MS * 2 ** attempt);
  attempt += 1;
  timer = setTimeout(open, MIN_DELAY_MS / 2 + Math.random() * (ceiling - MIN_DELAY_MS / 2));
}

/** Starts listening (the first caller opens the stream); the returned function stops. */
export function subscribeLive(onMessage: (m: LiveMessage) => void): () => void {
  messageListeners.add(onMessage);
  users += 1;
  if (users === 1 && !source && !timer) open();
  return () => {
    messageListeners.delete(onMessage);
    users -= 1;
    if (users > 0) return;
    if (timer) clearTimeout(timer);
    timer = null;
    source?.close();
    source = null;
    status = "connecting";
  };
}

export function subscribeLiveStatus(onChange: () => void): () => void {
  statusListeners.add(onChange);
  return () => statusListeners.delete(onChange);
}

export function liveStatus(): LiveStatus {
  return status;
}
