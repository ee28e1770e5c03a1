import { createHmac, randomBytes, timingSafeEqual } from "node:crypto";
import { z } from "zod";

// Webhook signatures. Each delivery carries
//   Hearth-Signature: t=<unix seconds>,v1=<hex HMAC-SHA256(secret, "<t>.<raw body>")>
//   Hearth-Event-Id: <uuid of the event>   (the same on every retry: the receiver's idempotency key)
// HMAC-SHA256 as in RFC 2104 / FIPS 198-1. The timestamp is signed with the body so that a
// receiver can refuse an old delivery replayed later (we suggest a 5-minute tolerance).

export const SIGNATURE_HEADER = "Hearth-Signature";
export const EVENT_ID_HEADER = "Hearth-Event-Id";
export const EVENT_TYPE_HEADER = "Hearth-Event-Type";
export const SIGNATURE_TOLERANCE_SECONDS = 300;

export const WEBHOOK_EVENT_TYPES = [
  "order.created",
  "order.late",
  "build.scheduled",
  "build.started",
  "build.finished",
  "furnace_run.finished",
  "furnace_run.unloaded",
  "unit.ready_for_finishing",
  "unit.scrapped",
  "inspection.recorded",
] as const;
export type WebhookEventType = (typeof WEBHOOK_EVENT_TYPES)[number];

export function newWebhookSecret(): string {
  return `whsec_${randomBytes(24).toString("base64url")}`;
}

/** Hex HMAC-SHA256 of a UTF-8 message. */
export function hmacSha256Hex(key: string, message: string): string {
  return createHmac("sha256", key).update(message, "utf8").digest("hex");
}

export function signatureOf(secret: string, timestamp: number, body: string): string {
  return hmacSha256Hex(secret, `${timestamp}.${body}`);
}

export function signatureHeader(secret: string, timestamp: number, body: string): string {
  return `t=${timestamp},v1=${signatureOf(secret, timestamp, body)}`;
}

export type VerifyResult = { ok: true; timestamp: number } | { ok: false; reason: string };

/** Checks a Hearth-Signature header against the raw body, in constant time. */
export function verifySignature(secret: string, header: string | null | undefined, body: string, nowSeconds: number, tolerance = SIGNATURE_TOLERANCE_SECONDS): VerifyResult {
  if (!header) return { ok: false, reason: "no signature header" };
  const parts = Object.fromEntries(header.split(",").map((p) => p.trim().split("=", 2) as [string, string]));
  const t = Number(parts.t);
  if (!Number.isInteger(t)) return { ok: false, reason: "no timestamp" };
  if (Math.abs(nowSeconds - t) > tolerance) return { ok: false, reason: "timestamp outside the tolerance" };
  const given = Buffer.from(parts.v1 ?? "", "hex");
  const wanted = Buffer.from(signatureOf(secret, t, body), "hex");
  if (given.length !== wanted.length || !timingSafeEqual(given, wanted)) return { ok: false, reason: "signature does not match" };
  return { ok: true, timestamp: t };
}

/**
 * The shortest wait pg-boss 10 leaves before retrying a job with retryBackoff after its n-th failed
 * run: retryDelay · 2^min(16, n) / 2, to which it adds up to as much again at random (the failJobs
 * statement in node_modules/pg-boss/src/plans.js). Shown in the delivery log as the next attempt.
 */
export function retryDelaySeconds(failedAttempts: number, baseSeconds = 30): number {
  return (baseSeconds * 2 ** Math.min(16, Math.max(1, failedAttempts))) / 2;
}

/** Deliveries that keep failing for this long pause their endpoint. */
export const PAUSE_AFTER_FAILING_MS = 24 * 60 * 60 * 1000;

export const createWebhookSchema = z.object({
  url: z.url({ protocol: /^https?$/, error: "An http:// or https:// address" }).max(2000, "At most 2000 characters"),
  description: z.string().trim().max(200, "At most 200 characters").default(""),
  events: z.array(z.enum([...WEBHOOK_EVENT_TYPES, "*"])).min(1, "Pick at least one event").transform((e) => [...new Set(e)]),
});
export type CreateWebhookInput = z.infer<typeof createWebhookSchema>;

export const updateWebhookSchema = z.object({
  version: z.coerce.number().int().positive(),
  active: z.boolean().optional(),
  resume: z.literal(true).optional(),
  events: createWebhookSchema.shape.events.optional(),
});
