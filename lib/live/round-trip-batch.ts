// Many callers, one round trip: after each change every open page asks again at once, and each
// request's sign-in check and change stamp was a query of its own (a hundred and fifty pages, a
// hundred and fifty queries queued on the pool for the same few rows). Here the callers that
// arrive while one round trip is out wait together for the next, which carries all their keys.
// A caller is only ever answered by a round trip sent after it asked: what was committed before
// the request arrived (a sign-out everywhere, a deactivated user, a new change stamp) is seen
// exactly as by a query of its own. DataLoader's batches (one per tick) would also do that, but
// would send a round trip per tick of a burst; here at most one is out at a time. Pure.

type Waiting<K, R> = { keys: Set<K>; result: Promise<R>; resolve: (r: R) => void; reject: (e: unknown) => void };

export class RoundTripBatch<K, R> {
  private waiting: Waiting<K, R> | null = null;
  /** Groups that reached maxKeys, in the order they filled, sent before the one still gathering. */
  private full: Waiting<K, R>[] = [];
  private out = false;

  /** run: one round trip for every key gathered (each key once); maxKeys: the most per trip. */
  constructor(
    private readonly run: (keys: K[]) => Promise<R>,
    private readonly maxKeys = 500,
  ) {}

  /** The answer of a round trip that carries key and was sent after this call. */
  ask(key: K): Promise<R> {
    if (!this.waiting || this.waiting.keys.size >= this.maxKeys) {
      // A full group is left to go as it is; this caller starts the next (sent after it).
      if (this.waiting) this.full.push(this.waiting);
      let resolve!: (r: R) => void;
      let reject!: (e: unknown) => void;
      const result = new Promise<R>((res, rej) => {
        resolve = res;
        reject = rej;
      });
      this.waiting = { keys: new Set(), result, resolve, reject };
      // Sent on the next turn of the event loop when nothing is out, so that the requests read
      // from the sockets in the same turn go together.
      if (!this.out) setImmediate(() => this.send());
    }
    this.waiting.keys.add(key);
    return this.waiting.result;
  }

  private send(): void {
    if (this.out) return;
    const next = this.full.shift() ?? this.waiting;
    if (!next) return;
    if (next === this.waiting) this.waiting = null;
    this.out = true;
    let trip: Promise<R>;
    try {
      trip = this.run([...next.keys]);
    } catch (err) {
      trip = Promise.reject(err);
    }
    trip.then(next.resolve, next.reject).finally(() => {
      this.out = false;
      this.send();
    });
  }
}
