// Shared by every STL upload (a part's geometry, a quote line's model): the checks on the
// request, the body spooled to disk (spool-upload.ts), the object stored and the analysis queued.
import { PutObjectCommand } from "@aws-sdk/client-s3";
import type { Transaction } from "kysely";
import type { DB } from "@/db/schema";
import { getSender, inTrx } from "@/db/jobs/boss";
import { getS3 } from "@/adapters/storage/s3";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { checkStlShape, parseStl, StlError } from "@/lib/geometry/stl";
import { QUEUES } from "@/lib/jobs/queues";
import { spoolUpload, type SpooledUpload } from "@/app/_server/spool-upload";

// Browsers and CAD tools label STL files in many ways; none of these can carry anything else.
export const STL_TYPES = new Set(["", "application/octet-stream", "model/stl", "model/x.stl-binary", "model/x.stl-ascii", "application/sla", "application/vnd.ms-pki.stl", "text/plain"]);

// A storage hiccup is retried; a file that cannot be parsed never reaches the queue.
const GEOMETRY_RETRY_LIMIT = 3;

export interface ReceivedStl {
  filename: string;
  upload: SpooledUpload;
  /** Counted here when the file was small enough to parse whole; otherwise from its shape. */
  triangles: number | null;
}

/**
 * Reads an STL upload (raw body, name in the x-filename header or `filenameParam`): refused with
 * the field and the reason before anything is stored. The caller disposes of `upload`.
 */
export async function receiveStl(req: Request, filenameParam?: string | null): Promise<ReceivedStl> {
  const env = getEnv();
  const filename = decodeURIComponent(req.headers.get("x-filename") ?? filenameParam ?? "").trim();
  if (!filename) throw new AppError("invalid", "Name the file (x-filename header).", { file: ["the file name is missing"] });
  if (!/\.stl$/i.test(filename)) throw new AppError("invalid", `${filename} is not an STL file; upload a .stl file.`, { file: ["only .stl files are accepted"] });
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  if (!STL_TYPES.has(type)) throw new AppError("unsupported_media_type", `A ${type} upload cannot be an STL file.`, { file: [`content type ${type} is not accepted`] });
  const max = env.UPLOAD_MAX_BYTES;
  const upload = await spoolUpload(req, {
    maxBytes: max,
    keepBytes: Math.min(env.UPLOAD_PARSE_MAX_BYTES, max),
    tooLarge: () => new AppError("payload_too_large", `The file is larger than the ${Math.round(max / 1024 / 1024)} MB upload limit.`, { file: ["over the size limit"] }),
  });
  try {
    if (upload.size === 0) throw new AppError("invalid", "The file is empty.", { file: ["the file is empty"] });
    // Small enough: parsed whole here. Larger: its shape is checked and the worker parses it from the store.
    const triangles = upload.bytes ? parseStl(upload.bytes, { maxBytes: max }).triangleCount : checkStlShape(upload.head, upload.size, upload.tail).triangles;
    return { filename, upload, triangles };
  } catch (err) {
    await upload.dispose();
    if (err instanceof StlError) throw new AppError("invalid", `${filename} cannot be read as STL: ${err.message}.`, { file: [err.message] }, { stl_code: err.stlCode });
    throw err;
  }
}

/**
 * Stores the spooled file, outside any transaction: a store that hangs then holds this request
 * only, never a database connection. A row that fails to commit afterwards must take the object
 * back out (deleteObjectQuietly); what even that misses, the worker's orphan sweep removes.
 */
export async function storeStl(key: string, upload: SpooledUpload): Promise<void> {
  try {
    await getS3().send(new PutObjectCommand({ Bucket: getEnv().S3_BUCKET, Key: key, Body: upload.open(), ContentLength: upload.size, ContentType: "model/stl" }));
  } catch (err) {
    console.error("[storage] put failed:", err instanceof Error ? err.message : err);
    throw new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment.");
  }
}

/** The files row for a stored STL, queued for analysis in the same transaction. */
export async function recordStl(trx: Transaction<DB>, fileId: string, key: string, stl: ReceivedStl, uploadedBy: string) {
  const boss = await getSender();
  const row = await trx
    .insertInto("files")
    .values({ id: fileId, kind: "geometry", bucket: getEnv().S3_BUCKET, object_key: key, filename: stl.filename.slice(0, 200), content_type: "model/stl", size_bytes: stl.upload.size, sha256: stl.upload.sha256, status: "queued", uploaded_by: uploadedBy })
    .returningAll()
    .executeTakeFirstOrThrow();
  const job = await boss.send(QUEUES.geometry, { file_id: fileId }, { db: inTrx(trx), retryLimit: GEOMETRY_RETRY_LIMIT, retryDelay: 5, retryBackoff: true });
  if (!job) throw new AppError("unavailable", "The analysis queue is not ready (is the worker running?); nothing was stored.");
  return row;
}
