/**
 * Next.js (16, server/send-response.js) drops Content-Length from every route handler's answer,
 * since a body it decoded on the way may no longer match. A route that streams bytes whose
 * length it knows (a stored file) names it in this header instead; the server (scripts/serve.ts)
 * turns it back into Content-Length when the answer is not re-encoded, so a browser can show
 * the download's progress.
 */
export const DECLARED_LENGTH_HEADER = "x-hearth-content-length";

/** The Content-Length to send for a declared length, or null when it is not a plain byte count. */
export function declaredLength(value: unknown): string | null {
  const s = Array.isArray(value) ? value[0] : value;
  return typeof s === "string" && /^\d{1,15}$/.test(s) ? s : typeof s === "number" && Number.isSafeInteger(s) && s >= 0 ? String(s) : null;
}
