import { z } from "zod";

// Queue names and payload schemas, shared by the web app (which sends) and the worker.
// Payloads outlive deploys, so handlers parse them with these schemas.
export const QUEUES = {
  heartbeat: "heartbeat",
} as const;

export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

export const heartbeatSchema = z.object({}).passthrough();

export const ALL_QUEUES: QueueName[] = Object.values(QUEUES);
