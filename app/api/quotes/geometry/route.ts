import { randomUUID } from "node:crypto";
import { PutObjectCommand } from "@aws-sdk/client-s3";
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { checkStlShape, parseStl, StlError } from "@/lib/geometry/stl";
import { toErrorResponse } from "@/app/_server/errors";
import { getSender, inTrx } from "@/db/jobs/boss";
import { QUEUES } from "@/lib/jobs/queues";
import { deleteObjectQuietly, getS3 } from "@/adapters/storage/s3";
import { spoolUpload, type SpooledUpload } from "@/app/_server/spool-upload";
import { STL_TYPES } from "@/app/_server/stl-upload";

// A storage hiccup is retried; a file that cannot be parsed never reaches the queue.
const GEOMETRY_RETRY_LIMIT = 3;

// POST /api/quotes/geometry – a customer's STL for a quote line (raw body, name in x-filename): spooled to disk as it arrives, checked, stored and analysed by the worker exactly as a part's geometry; poll /api/files/[id] (manager, admin)
export async function POST(req: Request) {
  let upload: SpooledUpload | null = null;
  let storedKey: string | null = null;
  try {
    const user = await requireUser("quotes:write");
    const env = getEnv();
    const filename = decodeURIComponent(req.headers.get("x-filename") ?? "").trim();
    if (!filename) throw new AppError("invalid", "Name the file (x-filename header).", { file: ["the file name is missing"] });
    if (!/\.stl$/i.test(filename)) throw new AppError("invalid", `${filename} is not an STL file; upload a .stl file.`, { file: ["only .stl files are accepted"] });
    const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
    if (!STL_TYPES.has(type)) throw new AppError("unsupported_media_type", `A ${type} upload cannot be an STL file.`, { file: [`content type ${type} is not accepted`] });
    const max = env.UPLOAD_MAX_BYTES;
    upload = await spoolUpload(req, {
      maxBytes: max,
      keepBytes: Math.min(env.UPLOAD_PARSE_MAX_BYTES, max),
      tooLarge: () => new AppError("payload_too_large", `The file is larger than the ${Math.round(max / 1024 / 1024)} MB upload limit.`, { file: ["over the size limit"] }),
    });
    if (upload.size === 0) throw new AppError("invalid", "The file is empty.", { file: ["the file is empty"] });
    let triangles: number | null;
    try {
      // Small enough: parsed whole here. Larger: its shape is checked and the worker parses it from the store.
      triangles = upload.bytes ? parseStl(upload.bytes, { maxBytes: max }).triangleCount : checkStlShape(upload.head, upload.size, upload.tail).triangles;
    } catch (err) {
      if (err instanceof StlError) throw new AppError("invalid", `${filename} cannot be read as STL: ${err.message}.`, { file: [err.message] }, { stl_code: err.stlCode });
      throw err;
    }
    const fileId = randomUUID();
    const key = `geometry/quotes/${fileId}.stl`;
    const boss = await getSender();
    // Stored first, outside any transaction: a store that hangs holds this request only, never a
    // database connection. A row that fails to commit takes the object back out below; what even
    // that misses, the worker's orphan sweep removes.
    storedKey = key;
    try {
      await getS3().send(new PutObjectCommand({ Bucket: env.S3_BUCKET, Key: key, Body: upload.open(), ContentLength: upload.size, ContentType: "model/stl" }));
    } catch (err) {
      console.error("[storage] put failed:", err instanceof Error ? err.message : err);
      throw new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment.");
    }
    const file = await getDb().transaction().execute(async (trx) => {
      const row = await trx
        .insertInto("files")
        .values({ id: fileId, kind: "geometry", bucket: env.S3_BUCKET, object_key: key, filename: filename.slice(0, 200), content_type: "model/stl", size_bytes: upload!.size, sha256: upload!.sha256, status: "queued", uploaded_by: user.id })
        .returning(["id", "filename", "status", "size_bytes"])
        .executeTakeFirstOrThrow();
      const job = await boss.send(QUEUES.geometry, { file_id: fileId }, { db: inTrx(trx), retryLimit: GEOMETRY_RETRY_LIMIT, retryDelay: 5, retryBackoff: true });
      if (!job) throw new AppError("unavailable", "The analysis queue is not ready (is the worker running?); nothing was stored.");
      return row;
    });
    storedKey = null;
    return NextResponse.json({ file: { ...file, triangles } }, { status: 201 });
  } catch (err) {
    if (storedKey) await deleteObjectQuietly(getEnv().S3_BUCKET, storedKey);
    return toErrorResponse(err);
  } finally {
    await upload?.dispose();
  }
}
