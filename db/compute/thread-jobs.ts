// The computations that run on a compute thread (db/compute/threads.ts), by name. Each takes and
// returns plain data (structured-clone safe: no functions, no class instances but Date).
import { suggestBatches } from "@/lib/batches/suggest";
import { planFloor } from "@/lib/floor/plan";

export const THREAD_JOBS = {
  /** "Suggest batches": wash batches and furnace runs, with the tray packer's search. */
  suggest: suggestBatches,
  /** "Propose plan": the printer plan with its local search. */
  floor: planFloor,
};

export type ThreadJobName = keyof typeof THREAD_JOBS;
export type ThreadJobInput<K extends ThreadJobName> = Parameters<(typeof THREAD_JOBS)[K]>[0];
export type ThreadJobResult<K extends ThreadJobName> = ReturnType<(typeof THREAD_JOBS)[K]>;

export type ThreadRequest = { id: number; name: ThreadJobName; input: unknown };
export type ThreadReply =
  | { id: number; ok: true; result: unknown }
  | { id: number; ok: false; error: { name: string; message: string; field?: string; details?: Record<string, unknown>; stack?: string } };
