// The one LISTEN connection of a web process. A dedicated pg.Client (a pooled connection would
// be handed to other queries, and LISTEN lives on the session); when it drops, it reconnects
// with growing pauses, and every failure is reported to onState rather than thrown: an idle
// connection cut by the server emits 'error' and 'end', which unheard would end the process.
import pg from "pg";
import { CHANGE_CHANNEL } from "@/lib/live/changes";

export type ListenerState = "connecting" | "listening" | "down" | "stopped";

export type ListenerOptions = {
  connectionString: string;
  onPayload: (payload: string | undefined) => void;
  /** Called on every change of state; `resumed` is true when listening again after a drop. */
  onState?: (state: ListenerState, info: { resumed: boolean; error?: string }) => void;
  minDelayMs?: number;
  maxDelayMs?: number;
  /** Names the connection in pg_stat_activity. */
  applicationName?: string;
};

export class ChangeListener {
  private client: pg.Client | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private attempt = 0;
  private everListened = false;
  private stopped = false;
  state: ListenerState = "connecting";
  lastError: string | null = null;
  reconnects = 0;

  constructor(private readonly opts: ListenerOptions) {}

  start(): void {
    this.stopped = false;
    void this.connect();
  }

  private setState(state: ListenerState, info: { resumed: boolean; error?: string } = { resumed: false }) {
    this.state = state;
    if (info.error) this.lastError = info.error;
    this.opts.onState?.(state, info);
  }

  private async connect(): Promise<void> {
    if (this.stopped) return;
    this.setState("connecting");
    const client = new pg.Client({ connectionString: this.opts.connectionString, keepAlive: true, application_name: this.opts.applicationName ?? "hearth-live" });
    this.client = client;
    let failed = false;
    const fail = (err: unknown) => {
      if (failed) return;
      failed = true;
      if (this.client === client) this.client = null;
      client.removeAllListeners("notification");
      // A late 'error' from a client already given up must still be heard.
      client.on("error", () => undefined);
      void client.end().catch(() => undefined);
      if (this.stopped) return;
      this.setState("down", { resumed: false, error: err instanceof Error ? err.message : String(err ?? "connection ended") });
      this.schedule();
    };
    client.on("error", fail);
    client.on("end", () => fail(new Error("connection ended")));
    client.on("notification", (msg) => {
      if (msg.channel === CHANGE_CHANNEL) this.opts.onPayload(msg.payload);
    });
    try {
      await client.connect();
      await client.query(`listen ${CHANGE_CHANNEL}`);
    } catch (err) {
      fail(err);
      return;
    }
    if (this.stopped || failed) {
      if (!failed) void client.end().catch(() => undefined);
      return;
    }
    const resumed = this.everListened;
    this.everListened = true;
    this.attempt = 0;
    if (resumed) this.reconnects += 1;
    this.setState("listening", { resumed });
  }

  private schedule(): void {
    if (this.timer || this.stopped) return;
    const min = this.opts.minDelayMs ?? 250;
    const max = this.opts.maxDelayMs ?? 10_000;
    // Exponential back-off with full jitter, so that many processes do not retry in step.
    const ceiling = Math.min(max, min * 2 ** this.attempt);
    this.attempt += 1;
    const delay = min + Math.random() * (ceiling - min);
    this.timer = setTimeout(() => {
      this.timer = null;
      void this.connect();
    }, delay);
    this.timer.unref?.();
  }

  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    const client = this.client;
    this.client = null;
    this.setState("stopped");
    if (client) {
      client.removeAllListeners("end");
      client.on("error", () => undefined);
      await client.end().catch(() => undefined);
    }
  }
}
