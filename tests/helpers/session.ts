import { DEMO_PASSWORD } from "@/db/seed-users";
import { appUrl } from "./browser";

export const DEMO = {
  admin: "admin@demo.hearth.test",
  manager: "manager@demo.hearth.test",
  technician: "technician@demo.hearth.test",
  furnace_operator: "furnace@demo.hearth.test",
  machinist: "machinist@demo.hearth.test",
} as const;

/** Signs in through the real API and returns the Cookie header to send with later requests. */
export async function signIn(email: string, password = DEMO_PASSWORD): Promise<string> {
  const res = await fetch(`${appUrl()}/api/session`, {
    method: "POST",
    headers: { "content-type": "application/json", "x-forwarded-for": `10.0.0.${Math.floor(Math.random() * 250) + 1}` },
    body: JSON.stringify({ email, password }),
  });
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${await res.text()}`);
  const cookie = res.headers.getSetCookie().find((c) => c.startsWith("hearth_session="));
  if (!cookie) throw new Error("sign-in returned no session cookie");
  return cookie.split(";")[0];
}

export type ApiResult<T = any> = { status: number; body: T; headers: Headers }; // eslint-disable-line @typescript-eslint/no-explicit-any

/** Calls the running app's API; a body object is sent as JSON, a string as it is. */
export async function api<T = any>( // eslint-disable-line @typescript-eslint/no-explicit-any
  path: string,
  opts: { method?: string; body?: unknown; cookie?: string; headers?: Record<string, string> } = {},
): Promise<ApiResult<T>> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.cookie) headers.cookie = opts.cookie;
  let body: BodyInit | undefined;
  if (typeof opts.body === "string" || opts.body instanceof Uint8Array || opts.body instanceof FormData) body = opts.body as BodyInit;
  else if (opts.body !== undefined) {
    body = JSON.stringify(opts.body);
    headers["content-type"] ??= "application/json";
  }
  const res = await fetch(`${appUrl()}${path}`, { method: opts.method ?? "GET", headers, body, redirect: "manual" });
  const text = await res.text();
  let parsed: unknown = text;
  try {
    parsed = text ? JSON.parse(text) : null;
  } catch {
    /* not JSON */
  }
  return { status: res.status, body: parsed as T, headers: res.headers };
}
