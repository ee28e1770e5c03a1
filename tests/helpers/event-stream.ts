// A server-sent event stream read the way a browser's EventSource reads it
// (https://html.spec.whatwg.org/multipage/server-sent-events.html#event-stream-interpretation),
// with the arrival time of every event, for the live-update tests and the benchmark.

export type StreamEvent = { id: string | null; event: string; data: string; at: number };

export type EventStream = {
  status: number;
  headers: Headers;
  events: StreamEvent[];
  /** Comment lines (": …") and retry hints seen so far. */
  comments: string[];
  retry: number | null;
  ended: Promise<void>;
  /** The first event (past or future) that satisfies pred, or a rejection after timeoutMs. */
  waitFor: (pred: (e: StreamEvent) => boolean, timeoutMs: number) => Promise<StreamEvent>;
  close: () => void;
};

export async function openEventStream(url: string, headers: Record<string, string> = {}): Promise<EventStream> {
  const ctrl = new AbortController();
  const res = await fetch(url, { headers: { accept: "text/event-stream", ...headers }, signal: ctrl.signal });
  const events: StreamEvent[] = [];
  const comments: string[] = [];
  const waiters = new Set<{ pred: (e: StreamEvent) => boolean; resolve: (e: StreamEvent) => void }>();
  const stream: EventStream = {
    status: res.status,
    headers: res.headers,
    events,
    comments,
    retry: null,
    ended: Promise.resolve(),
    waitFor: (pred, timeoutMs) => {
      const seen = events.find(pred);
      if (seen) return Promise.resolve(seen);
      return new Promise((resolve, reject) => {
        const w = {
          pred,
          resolve: (e: StreamEvent) => {
            clearTimeout(timer);
            waiters.delete(w);
            resolve(e);
          },
        };
        const timer = setTimeout(() => {
          waiters.delete(w);
          reject(new Error(`no matching event within ${timeoutMs} ms (saw ${events.map((e) => e.event).join(", ") || "none"})`));
        }, timeoutMs);
        waiters.add(w);
      });
    },
    close: () => ctrl.abort(),
  };
  if (res.status !== 200 || !res.body) {
    await res.body?.cancel().catch(() => undefined);
    return stream;
  }
  const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
  stream.ended = (async () => {
    let buf = "";
    let cur: { id: string | null; event: string; data: string[] } = { id: null, event: "message", data: [] };
    let lastId: string | null = null;
    try {
      for (;;) {
        const { value, done } = await reader.read();
        if (done) break;
        buf += value;
        let nl: number;
        while ((nl = buf.indexOf("\n")) >= 0) {
          const line = buf.slice(0, nl).replace(/\r$/, "");
          buf = buf.slice(nl + 1);
          if (line === "") {
            if (cur.data.length) {
              const e: StreamEvent = { id: cur.id ?? lastId, event: cur.event, data: cur.data.join("\n"), at: performance.now() };
              lastId = e.id;
              events.push(e);
              for (const w of [...waiters]) if (w.pred(e)) w.resolve(e);
            }
            cur = { id: null, event: "message", data: [] };
          } else if (line.startsWith(":")) comments.push(line.slice(1).trim());
          else {
            const c = line.indexOf(":");
            const field = c < 0 ? line : line.slice(0, c);
            const val = c < 0 ? "" : line.slice(c + 1).replace(/^ /, "");
            if (field === "data") cur.data.push(val);
            else if (field === "event") cur.event = val;
            else if (field === "id") cur.id = val;
            else if (field === "retry") stream.retry = Number(val);
          }
        }
      }
    } catch {
      /* aborted */
    }
  })();
  return stream;
}

export type ChangeItem = { e: string; id?: string; v?: number; unit?: string; s?: string };

/** The changes an event carries (empty for other kinds of event). */
export function changesOf(e: StreamEvent): ChangeItem[] {
  if (e.event !== "change") return [];
  return (JSON.parse(e.data) as { changes: ChangeItem[] }).changes;
}

/** Matches a change event naming this row (at this version, when given). */
export const names = (entity: string, id: string, version?: number) => (e: StreamEvent) =>
  changesOf(e).some((c) => c.e === entity && c.id === id && (version === undefined || c.v === version));
