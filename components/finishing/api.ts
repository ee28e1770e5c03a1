// Fetch helpers for the finishing, calibration, capacity and unit pages.
import { ApiError } from "@/lib/http/client";

export { ApiError, getJson, sendJson } from "@/lib/http/client";

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
