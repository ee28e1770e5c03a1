// When an unsent message is tried again, and whether a failure is worth trying again at all.
// Pure: the worker and the tests share it.

export type BackoffPolicy = { baseSeconds: number; maxSeconds: number };

export const DEFAULT_BACKOFF: BackoffPolicy = { baseSeconds: 15, maxSeconds: 600 };

/** Seconds to wait after the n-th failed attempt (n ≥ 1): base·2^(n−1), capped. */
export function retryDelaySeconds(attempts: number, policy: BackoffPolicy = DEFAULT_BACKOFF): number {
  const n = Math.max(1, Math.floor(attempts));
  return Math.min(policy.maxSeconds, policy.baseSeconds * 2 ** Math.min(n - 1, 30));
}

export function backoffFromEnv(env: Record<string, string | undefined> = process.env): BackoffPolicy {
  const base = Number(env.HEARTH_MAIL_BACKOFF_SECONDS);
  const max = Number(env.HEARTH_MAIL_BACKOFF_MAX_SECONDS);
  const baseSeconds = Number.isFinite(base) && base > 0 ? base : DEFAULT_BACKOFF.baseSeconds;
  const maxSeconds = Number.isFinite(max) && max >= baseSeconds ? max : Math.max(baseSeconds, DEFAULT_BACKOFF.maxSeconds);
  return { baseSeconds, maxSeconds };
}

/**
 * How long a sender holds a claimed message before another may send it: longer than the longest
 * send (the transport's connection, greeting and idle-socket timeouts, adapters/mail/transport.ts,
 * plus a queue wait in its pool), so only a sender that died mid-send is overtaken.
 */
export const DEFAULT_LEASE_SECONDS = 300;

export function leaseSecondsFromEnv(env: Record<string, string | undefined> = process.env): number {
  const v = Number(env.HEARTH_MAIL_LEASE_SECONDS);
  return Number.isFinite(v) && v >= 1 ? v : DEFAULT_LEASE_SECONDS;
}

/**
 * A relay that is down, slow or refusing connections is temporary: the message waits, however
 * long the outage. Only a relay that answers and rejects this message or its recipient
 * (RFC 5321 §4.2.1: 5yz after MAIL, RCPT or DATA) is a permanent failure.
 */
export function isPermanentSmtpFailure(err: unknown): boolean {
  const e = err as { code?: string; responseCode?: number } | null;
  if (!e || typeof e !== "object") return false;
  const rejectedThisMessage = e.code === "EENVELOPE" || e.code === "EMESSAGE";
  return rejectedThisMessage && typeof e.responseCode === "number" && e.responseCode >= 500 && e.responseCode < 600;
}
