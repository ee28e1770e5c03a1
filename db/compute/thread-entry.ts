// A compute thread's body: runs the named job of thread-jobs.ts for each message and posts the
// result or the error back. Started by db/compute/threads.ts through thread-boot.mjs.
import { parentPort } from "node:worker_threads";
import { THREAD_JOBS, type ThreadReply, type ThreadRequest } from "./thread-jobs";

const port = parentPort;
if (!port) throw new Error("thread-entry runs only as a worker thread");

port.on("message", (req: ThreadRequest) => {
  let reply: ThreadReply;
  try {
    const job = THREAD_JOBS[req.name] as (input: unknown) => unknown;
    if (!job) throw new Error(`no compute job named ${String(req.name)}`);
    reply = { id: req.id, ok: true, result: job(req.input) };
  } catch (err) {
    const e = (err instanceof Error ? err : new Error(String(err))) as Error & { field?: string; details?: Record<string, unknown> };
    reply = { id: req.id, ok: false, error: { name: e.name, message: e.message, field: e.field, details: e.details, stack: e.stack } };
  }
  port.postMessage(reply);
});
