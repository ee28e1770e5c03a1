import { z } from "zod";

// Queue names and payload schemas, shared by the web app (which sends) and the worker.
// Payloads outlive deploys, so handlers parse them with these schemas.
export const QUEUES = {
  heartbeat: "heartbeat",
  advance: "advance-booking",
  sendMail: "send-mail",
  scaleUp: "recompute-scale-up",
  geometry: "analyse-geometry",
  webhook: "deliver-webhook",
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

/** One notification_outbox row to send (the row carries its own retry schedule). */
export const sendMailJobSchema = z.object({ outbox_id: z.string().uuid() });
export type SendMailJob = z.infer<typeof sendMailJobSchema>;

/** A part, or every part of a material, needs its green size recomputed. */
export const scaleUpJobSchema = z.union([
  z.object({ part_id: z.string().uuid() }),
  z.object({ material_id: z.string().uuid() }),
]);
export type ScaleUpJob = z.infer<typeof scaleUpJobSchema>;

/** An uploaded geometry file to measure (volume, bounding box, closed check). */
export const geometryJobSchema = z.object({ file_id: z.string().uuid() });
export type GeometryJob = z.infer<typeof geometryJobSchema>;

/**
 * One webhook delivery to POST. The database writes this job itself (send_webhook_job in
 * migrations/202612042233_webhook_jobs.sql) with the same payload, so keep the two in step.
 */
export const webhookJobSchema = z.object({ delivery_id: z.string().uuid() });
export type WebhookJob = z.infer<typeof webhookJobSchema>;

export const ALL_QUEUES: QueueName[] = Object.values(QUEUES);
