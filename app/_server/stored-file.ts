// One way to answer with a stored object: streamed from the object store (never held whole in
// memory), bounded in the time the store takes to start answering (adapters/storage/s3.ts
// openObject), ended when the reader leaves, and a store failure said as such (503), never a 500.
import { openObject, type OpenedObject } from "@/adapters/storage/s3";
import { AppError } from "@/lib/errors";
import { DECLARED_LENGTH_HEADER } from "@/lib/http/declared-length";

export type StoredFile = { bucket: string; object_key: string; content_type: string; filename: string };

export async function storedFileResponse(req: Request, file: StoredFile, opts: { what: string; cache: string }): Promise<Response> {
  let obj: OpenedObject;
  try {
    obj = await openObject(file.bucket, file.object_key, req.signal);
  } catch {
    throw new AppError("unavailable", `File storage did not return the ${opts.what}; try again in a moment.`);
  }
  const headers: Record<string, string> = {
    "content-type": file.content_type,
    // Only plain characters in the header: a stored name came from the uploader.
    "content-disposition": `inline; filename="${file.filename.replace(/[^\w.-]/g, "_")}"`,
    "x-content-type-options": "nosniff",
    "cache-control": opts.cache,
  };
  if (obj.length !== undefined) headers[DECLARED_LENGTH_HEADER] = String(obj.length);
  return new Response(obj.body, { headers });
}
