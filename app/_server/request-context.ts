import { AsyncLocalStorage } from "node:async_hooks";
import { randomUUID } from "node:crypto";

/** What the web server knows about the request being answered; the request log line reads it at the end. */
export type RequestContext = { id: string; userId: string | null };

// One store for the process: the web server (scripts/serve.ts, loaded by tsx) and the built route
// handlers (loaded from the Next.js bundle) each get their own copy of this module, so the store
// itself lives on globalThis under a registered symbol.
const KEY = Symbol.for("hearth.request-context");
const holder = globalThis as unknown as Record<symbol, AsyncLocalStorage<RequestContext> | undefined>;
const storage = (holder[KEY] ??= new AsyncLocalStorage<RequestContext>());

export const runWithRequest = <T>(ctx: RequestContext, fn: () => T): T => storage.run(ctx, fn);

export const currentRequest = (): RequestContext | undefined => storage.getStore();

// A caller's own id is kept when it is short and plain (a proxy's, a load balancer's), so one id
// follows the request through every log; anything else is replaced rather than logged.
const SANE_ID = /^[A-Za-z0-9._:-]{8,128}$/;

export function requestIdFrom(incoming: string | string[] | undefined): string {
  const value = Array.isArray(incoming) ? incoming[0] : incoming;
  return value && SANE_ID.test(value) ? value : randomUUID();
}

/** Marks the signed-in user on the request's log line. */
export function noteUser(userId: string): void {
  const ctx = storage.getStore();
  if (ctx) ctx.userId = userId;
}
