import { createHash, randomUUID } from "node:crypto";
import { NextResponse } from "next/server";
import { PutObjectCommand } from "@aws-sdk/client-s3";
import { getDb } from "@/db/client";
import { findInspection } from "@/db/inspections/reads";
import { insertInspectionFile } from "@/db/inspections/commands";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { checkAttachment, safeFilename } from "@/lib/finishing/attachments";
import { ATTACHMENT_MAX_BYTES } from "@/lib/finishing/schemas";
import { toErrorResponse } from "@/app/_server/errors";
import { readLimitedForm } from "@/app/_server/limited-form";
import { deleteObjectQuietly, getS3 } from "@/adapters/storage/s3";

// POST /api/inspections/[id]/files – attach a photo (JPEG, PNG, WebP) or a PDF report, multipart field "file" (machinist, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  try {
    const user = await requireUser("inspections:write");
    const { id } = await params;
    const db = getDb();
    const inspection = await findInspection(db, id);
    if (!inspection) throw new AppError("not_found", "Inspection not found.");
    // The multipart envelope adds a little to the attachment's own limit; the count stops an oversized body as it arrives.
    const form = await readLimitedForm(req, ATTACHMENT_MAX_BYTES + 64 * 1024, "file");
    const file = form.get("file");
    if (!(file instanceof File)) throw new AppError("invalid", "Choose a file to attach.", { file: ["no file in the field \"file\""] });
    const bytes = new Uint8Array(await file.arrayBuffer());
    const contentType = checkAttachment(bytes, file.type, file.name || "the file");
    const filename = safeFilename(file.name || "attachment");
    const bucket = getEnv().S3_BUCKET;
    const objectKey = `inspections/${id}/${randomUUID()}-${filename}`;
    const sha256 = createHash("sha256").update(bytes).digest("hex");
    const s3 = getS3();
    // Stored before the row, outside any transaction; a store that hangs is given up after the
    // client's timeouts (adapters/storage/s3.ts) and holds no database connection meanwhile.
    try {
      await s3.send(new PutObjectCommand({ Bucket: bucket, Key: objectKey, Body: bytes, ContentType: contentType, ContentLength: bytes.byteLength }));
    } catch (err) {
      console.error("[storage] put failed:", err instanceof Error ? err.message : err);
      throw new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment.");
    }
    try {
      const row = await insertInspectionFile(db, id, { bucket, object_key: objectKey, filename, content_type: contentType, size_bytes: bytes.byteLength, sha256 }, user.id);
      return NextResponse.json(row, { status: 201 });
    } catch (err) {
      // The record did not land: take the object back out so nothing is left half-stored.
      await deleteObjectQuietly(bucket, objectKey);
      throw err;
    }
  } catch (err) {
    return toErrorResponse(err);
  }
}
