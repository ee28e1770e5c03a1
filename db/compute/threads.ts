// The searches behind "Suggest batches" and "Propose plan" run on worker threads, not on the web
// process's own thread (the web server calls startComputeThreads; db/compute/run.ts sends them).
// They are synchronous and may take the whole budget a person gives them (up to 30 s); on the
// request's thread every other request to that process, every page and every live update, would
// wait behind them.
//
// A small pool of long-lived threads (one per core beyond the first, at least one, at most two)
// takes the jobs; a thread runs one job at a time, and a job waits for the thread with the fewest
// jobs. A thread that does not answer within the budgets of its jobs plus a grace period is
// stopped, its jobs fail with 503, and the next job starts a new thread. The thread runs the TypeScript sources
// with tsx's loader (thread-boot.mjs), as the web server and the worker process themselves do
// (scripts/stack.ts).
import os from "node:os";
import path from "node:path";
import { Worker } from "node:worker_threads";
import { AppError, ComputationError } from "@/lib/errors";
import { installComputeRunner } from "./run";
import type { ThreadJobInput, ThreadJobName, ThreadJobResult, ThreadReply, ThreadRequest } from "./thread-jobs";

/** Extra time beyond the jobs' own budgets before a thread counts as stuck (HEARTH_COMPUTE_GRACE_MS, 30 s). */
function graceMs(): number {
  const v = Number(process.env.HEARTH_COMPUTE_GRACE_MS);
  return Number.isFinite(v) && v >= 0 ? v : 30_000;
}
/** The budget assumed for a job that sets none (the searches then stop on their work budget). */
const DEFAULT_BUDGET_MS = 30_000;

type Pending = { resolve: (v: unknown) => void; reject: (e: unknown) => void; timer: NodeJS.Timeout; budgetMs: number };

function entryPath(): string {
  // HEARTH_ROOT is set by scripts/serve.ts; tests, benchmarks and scripts run from the repository.
  return path.join(process.env.HEARTH_ROOT ?? process.cwd(), "db/compute/thread-boot.mjs");
}

class ComputeThread {
  private worker: Worker | null = null;
  readonly pending = new Map<number, Pending>();

  private start(): Worker {
    const w = new Worker(entryPath());
    w.on("message", (reply: ThreadReply) => {
      const p = this.pending.get(reply.id);
      if (!p) return;
      this.settle(reply.id);
      if (reply.ok) p.resolve(reply.result);
      else p.reject(rebuildError(reply.error));
    });
    w.on("error", (err) => this.fail(w, new AppError("unavailable", `The planner stopped with an error: ${err.message}`)));
    w.on("exit", (code) => this.fail(w, new AppError("unavailable", `The planner's thread ended (exit code ${code}); try again.`)));
    return w;
  }

  private settle(id: number) {
    const p = this.pending.get(id);
    if (p) clearTimeout(p.timer);
    this.pending.delete(id);
    // An idle thread must not keep a script or a test process alive.
    if (this.pending.size === 0) this.worker?.unref();
  }

  /** Fails every job of thread `w` and forgets it (the next job starts a new thread). */
  private fail(w: Worker, err: AppError) {
    if (this.worker !== w) return;
    this.worker = null;
    for (const [id, p] of [...this.pending]) {
      this.settle(id);
      p.reject(err);
    }
    void w.terminate();
  }

  /** Starts the thread ahead of its first job (loading the sources takes most of a second). */
  warm() {
    if (!this.worker) {
      this.worker = this.start();
      this.worker.unref();
    }
  }

  run(id: number, name: ThreadJobName, input: unknown, budgetMs: number): Promise<unknown> {
    const w = (this.worker ??= this.start());
    w.ref();
    // The thread takes its jobs in turn, so this one may first wait for those ahead of it.
    let waitMs = budgetMs + graceMs();
    for (const p of this.pending.values()) waitMs += p.budgetMs;
    return new Promise((resolve, reject) => {
      const timer = setTimeout(
        () => this.fail(w, new AppError("unavailable", `The planner did not answer within ${Math.round(waitMs / 1000)} s; try again with a shorter budget.`)),
        waitMs,
      );
      this.pending.set(id, { resolve, reject, timer, budgetMs });
      w.postMessage({ id, name, input } satisfies ThreadRequest);
    });
  }
}

function rebuildError(e: Extract<ThreadReply, { ok: false }>["error"]): Error {
  if (e.name === "ComputationError") return new ComputationError(e.message, e.field, e.details);
  const err = new Error(e.message);
  err.name = e.name;
  if (e.stack) err.stack = e.stack;
  return err;
}

const POOL_SIZE = Math.max(1, Math.min(2, (os.availableParallelism?.() ?? os.cpus().length) - 1));
const globalPool = globalThis as unknown as { hearthComputePool?: { threads: ComputeThread[]; seq: number } };

function pool() {
  return (globalPool.hearthComputePool ??= { threads: Array.from({ length: POOL_SIZE }, () => new ComputeThread()), seq: 0 });
}

/**
 * Runs the named computation on a compute thread and resolves with its result. A
 * ComputationError thrown there is thrown here again (so a route answers 422 with its field);
 * a thread that fails or hangs gives a 503.
 */
export function runOnComputeThread<K extends ThreadJobName>(name: K, input: ThreadJobInput<K>, budgetMs?: number): Promise<ThreadJobResult<K>> {
  const p = pool();
  const thread = p.threads.reduce((a, b) => (b.pending.size < a.pending.size ? b : a));
  return thread.run(++p.seq, name, input, budgetMs ?? DEFAULT_BUDGET_MS) as Promise<ThreadJobResult<K>>;
}

/**
 * Sends every later search (db/compute/run.ts) to this process's pool, and starts the pool's
 * threads now, so that the first "Suggest batches" does not wait for them to load.
 */
export function startComputeThreads(): void {
  installComputeRunner(runOnComputeThread);
  for (const t of pool().threads) t.warm();
}
