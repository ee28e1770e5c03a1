// The client side of app/api: JSON in and out, with the API's error body turned into an Error
// that keeps the status, the field errors and the details (current version, reason).

export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly fieldErrors: Record<string, string[]> = {},
    readonly details: Record<string, unknown> = {},
  ) {
    super(message);
    this.name = "ApiError";
  }
}

export async function apiJson<T>(path: string, init: { method?: string; body?: unknown; signal?: AbortSignal } = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, {
      method: init.method ?? "GET",
      headers: init.body !== undefined ? { "content-type": "application/json" } : undefined,
      body: init.body !== undefined ? JSON.stringify(init.body) : undefined,
      signal: init.signal,
      cache: "no-store",
    });
  } catch (err) {
    if ((err as Error)?.name === "AbortError") throw err;
    throw new ApiError(0, "The server did not answer; check the connection and try again.");
  }
  const text = await res.text();
  let body: unknown = null;
  try {
    body = text ? JSON.parse(text) : null;
  } catch {
    body = null;
  }
  if (!res.ok) {
    const e = (body as { error?: { message?: string; fieldErrors?: Record<string, string[]>; details?: Record<string, unknown> } } | null)?.error;
    if (res.status === 401 && typeof window !== "undefined") {
      // A signed-out session needs a full page load of the sign-in page, not a client route change.
      // eslint-disable-next-line @next/next/no-location-assign-relative-destination
      window.location.assign(`/sign-in?next=${encodeURIComponent(window.location.pathname)}`);
    }
    throw new ApiError(res.status, e?.message ?? `The server answered ${res.status}.`, e?.fieldErrors ?? {}, (e?.details as Record<string, unknown>) ?? {});
  }
  return body as T;
}
