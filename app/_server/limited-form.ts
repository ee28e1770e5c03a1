import { AppError } from "@/lib/errors";

/**
 * Reads a multipart/form-data body of at most `maxBytes`, counting the bytes as they arrive: a
 * declared Content-Length over the limit is refused before reading, and a body sent without one
 * (chunked) is cut off the moment it passes the limit, so an oversized upload is a 413 naming
 * `field` and is never buffered whole. A body that is not a form is a 400.
 */
export async function readLimitedForm(req: Request, maxBytes: number, field: string): Promise<FormData> {
  const tooLarge = () =>
    new AppError("payload_too_large", `Attachments are limited to ${Math.floor(maxBytes / 1024 / 1024)} MB.`, { [field]: ["too large"] }, { max_bytes: maxBytes });
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > maxBytes) throw tooLarge();
  if (!req.body) throw new AppError("bad_request", `Send the file as multipart/form-data in a field named "${field}".`);
  let size = 0;
  let over = false;
  const counted = req.body.pipeThrough(
    new TransformStream<Uint8Array, Uint8Array>({
      transform(chunk, controller) {
        size += chunk.byteLength;
        if (size > maxBytes) {
          over = true;
          controller.error(tooLarge());
        } else controller.enqueue(chunk);
      },
    }),
  );
  try {
    return await new Request(req.url, { method: "POST", headers: req.headers, body: counted, duplex: "half" } as RequestInit).formData();
  } catch {
    if (over) throw tooLarge();
    throw new AppError("bad_request", `Send the file as multipart/form-data in a field named "${field}".`);
  }
}
