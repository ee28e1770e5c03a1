// Where the planners' searches run. The web server (scripts/serve.ts) installs its pool of compute
// threads (db/compute/threads.ts) at start, and the searches then run there, off the request's
// thread. The pool is not imported here: Next.js bundles this module into the route handlers, and
// its bundler would try to bundle a thread's entry too, which must run from source with tsx. Without
// an installed pool (`next dev`, scripts, tests that call a command directly) a search runs in place.
import { THREAD_JOBS, type ThreadJobInput, type ThreadJobName, type ThreadJobResult } from "./thread-jobs";

export type ComputeRunner = <K extends ThreadJobName>(name: K, input: ThreadJobInput<K>, budgetMs?: number) => Promise<ThreadJobResult<K>>;

const RUNNER = Symbol.for("hearth.compute-runner");
const registry = globalThis as unknown as { [RUNNER]?: ComputeRunner };

/** Makes `runner` the one every later search goes to (the web server's pool of threads). */
export function installComputeRunner(runner: ComputeRunner): void {
  registry[RUNNER] = runner;
}

/** Runs the named search on the installed pool, or in place; says which. */
export async function runSearch<K extends ThreadJobName>(name: K, input: ThreadJobInput<K>, budgetMs?: number): Promise<{ result: ThreadJobResult<K>; onThread: boolean }> {
  const runner = registry[RUNNER];
  if (runner) return { result: await runner(name, input, budgetMs), onThread: true };
  const job = THREAD_JOBS[name] as (input: ThreadJobInput<K>) => ThreadJobResult<K>;
  return { result: job(input), onThread: false };
}
