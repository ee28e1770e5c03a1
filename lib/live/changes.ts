// What the database announces on the hearth_changes channel (migration 202612040510), and how
// a web process groups the announcements before telling its open pages. Pure: shared by the
// LISTEN connection, the event stream and its tests.
import { z } from "zod";

export const CHANGE_CHANNEL = "hearth_changes";

export const CHANGE_ENTITIES = ["build", "wash_batch", "furnace_run", "unit", "inspection", "maintenance", "equipment", "feedstock_lot", "material"] as const;
export type ChangeEntity = (typeof CHANGE_ENTITIES)[number];

export const changeSchema = z.object({
  e: z.enum(CHANGE_ENTITIES),
  id: z.string().uuid().optional(),
  v: z.number().int().optional(),
  unit: z.string().uuid().optional(),
  /** A booking's state after the change (migration 202612041152): build, wash batch, furnace run. */
  s: z.string().max(40).optional(),
});
export type Change = z.infer<typeof changeSchema>;

/** A notification's payload, or null for anything this version does not know. */
export function parseChange(payload: string | undefined): Change | null {
  if (!payload) return null;
  try {
    const parsed = changeSchema.safeParse(JSON.parse(payload));
    return parsed.success ? parsed.data : null;
  } catch {
    return null;
  }
}

/** Changes that move something on the floor's calendar (its window cache must forget). */
export const FLOOR_ENTITIES: ReadonlySet<ChangeEntity> = new Set(["build", "wash_batch", "furnace_run", "maintenance", "equipment"]);

/** Changes to what the batching board shows (its cache must forget); a booked build is not one. */
export const BOARD_ENTITIES: ReadonlySet<ChangeEntity> = new Set(["unit", "wash_batch", "furnace_run", "maintenance", "equipment"]);

/**
 * Whether a change may alter the units waiting for a wash (the board's list kept apart, db/batches/reads.ts):
 * not a booked wash batch moving to another slot, and not a unit that is not yet printed (a unit
 * is planned, then printing, then green; it never goes back), whose build was booked or moved.
 * A change that does not say its state is taken to touch it.
 */
export function touchesWaitingWash(c: Change): boolean {
  switch (c.e) {
    case "wash_batch":
      return c.s !== "draft" && c.s !== "scheduled";
    case "unit":
      return c.s !== "planned" && c.s !== "printing";
    case "furnace_run":
    case "material":
    case "equipment":
      return true;
    default:
      return false;
  }
}

/**
 * Collects changes for a short window and hands them over as one group, one entry per row
 * (the highest version seen): a proposal applied to forty units is one message, not forty.
 */
export class ChangeBatcher {
  private pending = new Map<string, Change>();
  private timer: ReturnType<typeof setTimeout> | null = null;

  constructor(
    private readonly flush: (changes: Change[]) => void,
    private readonly windowMs = 50,
  ) {}

  push(change: Change): void {
    const key = `${change.e}:${change.id ?? ""}`;
    const seen = this.pending.get(key);
    if (!seen || (change.v ?? 0) >= (seen.v ?? 0)) this.pending.set(key, change);
    if (!this.timer) this.timer = setTimeout(() => this.drain(), this.windowMs);
  }

  drain(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    if (!this.pending.size) return;
    const changes = [...this.pending.values()];
    this.pending.clear();
    this.flush(changes);
  }

  cancel(): void {
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    this.pending.clear();
  }
}

/** One server-sent event (https://html.spec.whatwg.org/multipage/server-sent-events.html). */
export function sseFrame(f: { id?: string; event?: string; data?: string; retryMs?: number; comment?: string }): string {
  let out = "";
  if (f.comment !== undefined) out += `: ${f.comment}\n`;
  if (f.retryMs !== undefined) out += `retry: ${Math.round(f.retryMs)}\n`;
  if (f.id !== undefined) out += `id: ${f.id}\n`;
  if (f.event !== undefined) out += `event: ${f.event}\n`;
  if (f.data !== undefined) for (const line of f.data.split("\n")) out += `data: ${line}\n`;
  return out + "\n";
}

/**
 * The last few groups a process sent, so that a page reconnecting with Last-Event-ID gets what it
 * missed. Ids are "<process>-<sequence>": an id from another process or from before a restart
 * cannot be replayed, and the page is told to refetch everything instead.
 */
export class ReplayLog {
  private entries: { seq: number; frame: string }[] = [];
  private seq = 0;

  constructor(
    readonly processId: string,
    private readonly capacity = 256,
  ) {}

  /** Records a group and returns its event id. */
  append(makeFrame: (id: string) => string): string {
    this.seq += 1;
    const id = `${this.processId}-${this.seq}`;
    this.entries.push({ seq: this.seq, frame: makeFrame(id) });
    if (this.entries.length > this.capacity) this.entries.shift();
    return id;
  }

  /** The frames after lastEventId, or null when they cannot be known (the caller resyncs). */
  since(lastEventId: string): string[] | null {
    const dash = lastEventId.lastIndexOf("-");
    if (dash < 0 || lastEventId.slice(0, dash) !== this.processId) return null;
    const seq = Number(lastEventId.slice(dash + 1));
    if (!Number.isInteger(seq) || seq < 0 || seq > this.seq) return null;
    if (seq === this.seq) return [];
    const first = this.entries[0]?.seq ?? this.seq + 1;
    // Older than the log keeps: something may have been lost.
    if (seq + 1 < first) return null;
    return this.entries.filter((e) => e.seq > seq).map((e) => e.frame);
  }

  get lastId(): string {
    return `${this.processId}-${this.seq}`;
  }
}
