import { randomUUID } from "node:crypto";
import { NextResponse } from "next/server";
import { PutObjectCommand } from "@aws-sdk/client-s3";
import { getDb } from "@/db/client";
import { findInspection } from "@/db/inspections/reads";
import { insertInspectionFile } from "@/db/inspections/commands";
import { requireUser } from "@/app/_server/session";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { acceptedAttachmentType, checkAttachmentHead, safeFilename } from "@/lib/finishing/attachments";
import { ATTACHMENT_MAX_BYTES } from "@/lib/finishing/schemas";
import { toErrorResponse } from "@/app/_server/errors";
import { spoolFormFile, type FormFileUpload } from "@/app/_server/form-file-upload";
import { deleteObjectQuietly, getS3 } from "@/adapters/storage/s3";

// POST /api/inspections/[id]/files – attach a photo (JPEG, PNG, WebP) or a PDF report, multipart field "file" (machinist, admin)
export async function POST(req: Request, { params }: { params: Promise<{ id: string }> }) {
  let upload: FormFileUpload | null = null;
  try {
    const user = await requireUser("inspections:write");
    const { id } = await params;
    const db = getDb();
    const inspection = await findInspection(db, id);
    if (!inspection) throw new AppError("not_found", "Inspection not found.");
    // The photo is spooled to disk as it arrives (never held whole): refused by its declared type
    // before its bytes are read (415), cut off at the limit (413), then checked by its first bytes (422).
    upload = await spoolFormFile(req, {
      field: "file",
      maxBytes: ATTACHMENT_MAX_BYTES,
      tooLarge: () => new AppError("payload_too_large", `Attachments are limited to ${ATTACHMENT_MAX_BYTES / 1024 / 1024} MB.`, { file: ["too large"] }, { max_bytes: ATTACHMENT_MAX_BYTES }),
      accept: (mimeType, name) => acceptedAttachmentType(mimeType, name || "the file"),
    });
    const contentType = checkAttachmentHead(upload.head, upload.size, upload.mimeType, upload.filename || "the file");
    const filename = safeFilename(upload.filename || "attachment");
    const bucket = getEnv().S3_BUCKET;
    const objectKey = `inspections/${id}/${randomUUID()}-${filename}`;
    // Stored before the row, outside any transaction; a store that hangs is given up after the
    // client's timeouts (adapters/storage/s3.ts) and holds no database connection meanwhile.
    try {
      await getS3().send(new PutObjectCommand({ Bucket: bucket, Key: objectKey, Body: upload.open(), ContentType: contentType, ContentLength: upload.size }));
    } catch (err) {
      console.error("[storage] put failed:", err instanceof Error ? err.message : err);
      throw new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment.");
    }
    try {
      const row = await insertInspectionFile(db, id, { bucket, object_key: objectKey, filename, content_type: contentType, size_bytes: upload.size, sha256: upload.sha256 }, user.id);
      return NextResponse.json(row, { status: 201 });
    } catch (err) {
      // The record did not land: take the object back out so nothing is left half-stored.
      await deleteObjectQuietly(bucket, objectKey);
      throw err;
    }
  } catch (err) {
    return toErrorResponse(err);
  } finally {
    await upload?.dispose();
  }
}
