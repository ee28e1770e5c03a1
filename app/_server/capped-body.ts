import type { AppError } from "@/lib/errors";

/**
 * A request body's bytes, refused with `tooLarge()` (a 413) as soon as its declared length or
 * the bytes read so far pass `max`, so that an oversized body is never read to its end.
 */
export async function readCappedBody(req: Request, max: number, tooLarge: () => AppError): Promise<Uint8Array> {
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > max) throw tooLarge();
  if (!req.body) return new Uint8Array();
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > max) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  // A fresh array of its own (not a view into a pooled buffer): readers may take its .buffer whole.
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}
