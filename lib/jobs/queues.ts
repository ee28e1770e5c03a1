import { z } from "zod";

// Queue names and payload schemas, shared by the web app (which sends) and the worker.
// Payloads outlive deploys, so handlers parse them with these schemas.
export const QUEUES = {
  heartbeat: "heartbeat",
  advance: "advance-booking",
} as const;

export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

export const heartbeatSchema = z.object({}).passthrough();

/** A booking reached its scheduled end: advance its units if it is still that booking. */
export const advanceJobSchema = z.object({
  entity: z.enum(["build", "wash_batch", "furnace_run"]),
  id: z.string().uuid(),
  version: z.number().int().positive(),
  due_at: z.string().datetime(),
});
export type AdvanceJob = z.infer<typeof advanceJobSchema>;

export const ALL_QUEUES: QueueName[] = Object.values(QUEUES);
