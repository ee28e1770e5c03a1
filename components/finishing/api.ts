// Fetch helpers for the finishing, calibration, capacity and unit pages: an error keeps the
// server's message, its field errors and details (a 409 says what the row is now).

export class ApiError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly code?: string,
    readonly fieldErrors?: Record<string, string[]>,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = "ApiError";
  }
}

async function parse<T>(res: Response): Promise<T> {
  const body = await res.json().catch(() => null);
  if (!res.ok) {
    const e = body?.error;
    throw new ApiError(res.status, e?.message ?? `The server answered ${res.status}.`, e?.code, e?.fieldErrors, e?.details);
  }
  return body as T;
}

export async function getJson<T>(url: string): Promise<T> {
  return parse<T>(await fetch(url, { headers: { accept: "application/json" }, cache: "no-store" }));
}

export async function sendJson<T>(url: string, method: "POST" | "PATCH" | "DELETE", body?: unknown): Promise<T> {
  return parse<T>(
    await fetch(url, {
      method,
      headers: { "content-type": "application/json", accept: "application/json" },
      body: body === undefined ? undefined : JSON.stringify(body),
    }),
  );
}

/** Multipart upload with progress (fetch cannot report upload progress). */
export function uploadWithProgress<T>(url: string, file: File, onProgress: (fraction: number) => void): Promise<T> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open("POST", url);
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total);
    };
    xhr.onerror = () => reject(new ApiError(0, "The upload did not reach the server; check the connection and try again."));
    xhr.onload = () => {
      let body: { error?: { message?: string; code?: string; fieldErrors?: Record<string, string[]> } } | null = null;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = null;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as T);
      else reject(new ApiError(xhr.status, body?.error?.message ?? `The server answered ${xhr.status}.`, body?.error?.code, body?.error?.fieldErrors));
    };
    const form = new FormData();
    form.append("file", file);
    xhr.send(form);
  });
}
