// Sign-in throttling: a fixed window over recorded failures, per account and per address.
// Pure, so the rule can be tested without a database; db/auth/commands.ts supplies the times.

export const THROTTLE_WINDOW_MS = 15 * 60 * 1000;
/** Failures allowed in the window before the next attempt must wait. */
export const THROTTLE_MAX_FAILURES = 5;

export type ThrottleVerdict = { blocked: false } | { blocked: true; retry_after_s: number; scope: "account" | "address" };

/**
 * With n ≥ max failures in the window, attempts stay blocked until enough of them age out that
 * fewer than max remain: that is when failure number n − max + 1 (oldest first) leaves the window.
 */
export function waitForFailures(failureTimesMs: number[], nowMs: number, max = THROTTLE_MAX_FAILURES, windowMs = THROTTLE_WINDOW_MS): number {
  const recent = failureTimesMs.filter((t) => t > nowMs - windowMs && t <= nowMs).sort((a, b) => a - b);
  if (recent.length < max) return 0;
  const releasing = recent[recent.length - max];
  return Math.max(0, releasing + windowMs - nowMs);
}

export function throttleVerdict(accountFailuresMs: number[], addressFailuresMs: number[], nowMs: number): ThrottleVerdict {
  const account = waitForFailures(accountFailuresMs, nowMs);
  const address = waitForFailures(addressFailuresMs, nowMs);
  if (account === 0 && address === 0) return { blocked: false };
  const ms = Math.max(account, address);
  return { blocked: true, retry_after_s: Math.ceil(ms / 1000), scope: account >= address ? "account" : "address" };
}

/** "Try again in 14 minutes" – rounded up, so the stated wait is never too short. */
export function describeWait(seconds: number): string {
  if (seconds <= 60) return seconds <= 1 ? "1 second" : `${seconds} seconds`;
  const minutes = Math.ceil(seconds / 60);
  return minutes === 1 ? "1 minute" : `${minutes} minutes`;
}

export function throttleMessage(verdict: Extract<ThrottleVerdict, { blocked: true }>): string {
  const who = verdict.scope === "account" ? "for this account" : "from this address";
  return `Too many failed sign-ins ${who}. Wait ${describeWait(verdict.retry_after_s)} and try again.`;
}
