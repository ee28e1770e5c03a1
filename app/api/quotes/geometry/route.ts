import { createHash, randomUUID } from "node:crypto";
import { DeleteObjectCommand, PutObjectCommand } from "@aws-sdk/client-s3";
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { parseStl, StlError } from "@/lib/geometry/stl";
import { toErrorResponse } from "@/app/_server/errors";
import { getSender, inTrx } from "@/db/jobs/boss";
import { QUEUES } from "@/lib/jobs/queues";
import { getS3 } from "@/adapters/storage/s3";
import { readLimited, STL_TYPES } from "@/app/_server/stl-upload";

// POST /api/quotes/geometry – a customer's STL for a quote line (raw body, name in x-filename): checked, stored and analysed by the worker exactly as a part's geometry; poll /api/files/[id] (manager, admin)
export async function POST(req: Request) {
  let storedKey: string | null = null;
  try {
    const user = await requireUser("quotes:write");
    const env = getEnv();
    const filename = decodeURIComponent(req.headers.get("x-filename") ?? "").trim();
    if (!filename) throw new AppError("invalid", "Name the file (x-filename header).", { file: ["the file name is missing"] });
    if (!/\.stl$/i.test(filename)) throw new AppError("invalid", `${filename} is not an STL file; upload a .stl file.`, { file: ["only .stl files are accepted"] });
    const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
    if (!STL_TYPES.has(type)) throw new AppError("unsupported_media_type", `A ${type} upload cannot be an STL file.`, { file: [`content type ${type} is not accepted`] });
    const bytes = await readLimited(req, env.UPLOAD_MAX_BYTES);
    if (bytes.byteLength === 0) throw new AppError("invalid", "The file is empty.", { file: ["the file is empty"] });
    try {
      parseStl(bytes, { maxBytes: env.UPLOAD_MAX_BYTES });
    } catch (err) {
      if (err instanceof StlError) throw new AppError("invalid", `${filename} cannot be read as STL: ${err.message}.`, { file: [err.message] }, { stl_code: err.stlCode });
      throw err;
    }
    const fileId = randomUUID();
    const key = `geometry/quotes/${fileId}.stl`;
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    const boss = await getSender();
    const file = await getDb().transaction().execute(async (trx) => {
      const row = await trx
        .insertInto("files")
        .values({ id: fileId, kind: "geometry", bucket: env.S3_BUCKET, object_key: key, filename: filename.slice(0, 200), content_type: "model/stl", size_bytes: bytes.byteLength, sha256, status: "queued", uploaded_by: user.id })
        .returning(["id", "filename", "status", "size_bytes"])
        .executeTakeFirstOrThrow();
      const job = await boss.send(QUEUES.geometry, { file_id: fileId }, { db: inTrx(trx), retryLimit: 3, retryDelay: 5, retryBackoff: true });
      if (!job) throw new AppError("unavailable", "The analysis queue is not ready (is the worker running?); nothing was stored.");
      // Stored last, inside the transaction: a failed put rolls the row back (as for a part's geometry).
      await getS3().send(new PutObjectCommand({ Bucket: env.S3_BUCKET, Key: key, Body: bytes, ContentType: "model/stl" }));
      storedKey = key;
      return row;
    });
    storedKey = null;
    return NextResponse.json({ file }, { status: 201 });
  } catch (err) {
    if (storedKey) await getS3().send(new DeleteObjectCommand({ Bucket: getEnv().S3_BUCKET, Key: storedKey })).catch(() => {});
    if (err && typeof err === "object" && "$metadata" in err) {
      return toErrorResponse(new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment."));
    }
    return toErrorResponse(err);
  }
}
