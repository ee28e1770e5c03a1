import { z } from "zod";

/** GET /api/jobs query: one queue's failed jobs, or all of them. */
export const listJobsQuerySchema = z.object({
  queue: z
    .string()
    .trim()
    .regex(/^[a-z0-9][a-z0-9_.-]{0,63}$/, "a queue name: lower-case letters, digits, '-', '_' or '.'")
    .optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
export type ListJobsQuery = z.infer<typeof listJobsQuerySchema>;
