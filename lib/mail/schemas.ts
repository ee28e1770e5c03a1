import { z } from "zod";

/** GET /api/mail query: captured messages, optionally for one recipient. */
export const listMailQuerySchema = z.object({
  to: z.string().trim().toLowerCase().email("an e-mail address").optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export type ListMailQuery = z.infer<typeof listMailQuerySchema>;

/** What the local capture server (scripts/fakes/mail-capture.ts) answers for GET /messages. */
export const capturedMessageSchema = z.object({
  id: z.string(),
  received_at: z.string(),
  from: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  html: z.string(),
  message_id: z.string().nullable(),
  attachments: z.array(z.object({ filename: z.string(), content_type: z.string(), size: z.number() })).default([]),
});
export type CapturedMessage = z.infer<typeof capturedMessageSchema>;
export const capturedListSchema = z.object({ messages: z.array(capturedMessageSchema) });
