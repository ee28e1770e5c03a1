import { createHash, randomUUID } from "node:crypto";
import { DeleteObjectCommand, PutObjectCommand } from "@aws-sdk/client-s3";
import { NextResponse } from "next/server";
import { sql } from "kysely";
import { getDb } from "@/db/client";
import { getPartOrThrow } from "@/db/parts/reads";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { parseStl, StlError } from "@/lib/geometry/stl";
import { toErrorResponse } from "@/app/_server/errors";
import { getSender, inTrx } from "@/db/jobs/boss";
import { QUEUES } from "@/lib/jobs/queues";
import { getS3 } from "@/adapters/storage/s3";
import { readId, type IdContext } from "@/app/api/builds/_helpers";
import { readLimited, STL_TYPES } from "@/app/_server/stl-upload";

// A storage hiccup is retried; a file that cannot be parsed never reaches the queue.
const GEOMETRY_RETRY_LIMIT = 3;

// POST /api/parts/[id]/geometry – upload the part's STL (raw body, name in x-filename); checked before anything is stored, analysed by the worker (technician, admin)
export async function POST(req: Request, ctx: IdContext) {
  let storedKey: string | null = null;
  try {
    const user = await requireUser("geometry:upload");
    const id = await readId(ctx, "Part");
    const db = getDb();
    const part = await getPartOrThrow(db, id);
    const env = getEnv();
    const filename = decodeURIComponent(req.headers.get("x-filename") ?? new URL(req.url).searchParams.get("filename") ?? "").trim();
    if (!filename) throw new AppError("invalid", "Name the file (x-filename header).", { file: ["the file name is missing"] });
    if (!/\.stl$/i.test(filename)) throw new AppError("invalid", `${filename} is not an STL file; upload a .stl file.`, { file: ["only .stl files are accepted"] });
    const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
    if (!STL_TYPES.has(type)) throw new AppError("invalid", `A ${type} upload cannot be an STL file.`, { file: [`content type ${type} is not accepted`] });
    const bytes = await readLimited(req, env.UPLOAD_MAX_BYTES);
    if (bytes.byteLength === 0) throw new AppError("invalid", "The file is empty.", { file: ["the file is empty"] });
    let triangles: number;
    try {
      triangles = parseStl(bytes, { maxBytes: env.UPLOAD_MAX_BYTES }).triangleCount;
    } catch (err) {
      if (err instanceof StlError) throw new AppError("invalid", `${filename} cannot be read as STL: ${err.message}.`, { file: [err.message] }, { stl_code: err.stlCode });
      throw err;
    }
    const fileId = randomUUID();
    const key = `geometry/${part.id}/${fileId}.stl`;
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    const boss = await getSender();
    const file = await db.transaction().execute(async (trx) => {
      const row = await trx
        .insertInto("files")
        .values({ id: fileId, kind: "geometry", bucket: env.S3_BUCKET, object_key: key, filename: filename.slice(0, 200), content_type: "model/stl", size_bytes: bytes.byteLength, sha256, status: "queued", uploaded_by: user.id })
        .returningAll()
        .executeTakeFirstOrThrow();
      await trx.updateTable("parts").set({ geometry_file_id: fileId, updated_at: sql`now()`, version: sql`version + 1` }).where("id", "=", part.id).execute();
      const job = await boss.send(QUEUES.geometry, { file_id: fileId }, { db: inTrx(trx), retryLimit: GEOMETRY_RETRY_LIMIT, retryDelay: 5, retryBackoff: true });
      if (!job) throw new AppError("unavailable", "The analysis queue is not ready (is the worker running?); nothing was stored.");
      // Stored last, inside the transaction: a failed put rolls the row back, and a failed
      // commit removes the object below, so no half-stored upload is left either way.
      await getS3().send(new PutObjectCommand({ Bucket: env.S3_BUCKET, Key: key, Body: bytes, ContentType: "model/stl" }));
      storedKey = key;
      return row;
    });
    storedKey = null;
    return NextResponse.json({ file: { ...file, triangles } }, { status: 201 });
  } catch (err) {
    if (storedKey) {
      await getS3().send(new DeleteObjectCommand({ Bucket: getEnv().S3_BUCKET, Key: storedKey })).catch(() => {});
    }
    if (err && typeof err === "object" && "$metadata" in err) {
      return toErrorResponse(new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment."));
    }
    return toErrorResponse(err);
  }
}
