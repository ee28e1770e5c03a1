import { randomUUID } from "node:crypto";
import { PutObjectCommand } from "@aws-sdk/client-s3";
import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { attachCertificate } from "@/db/inventory/commands";
import { findLotCertificate, getLotOrThrow } from "@/db/inventory/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { spoolUpload, type SpooledUpload } from "@/app/_server/spool-upload";
import { storedFileResponse } from "@/app/_server/stored-file";
import { readId, type IdContext } from "@/app/api/builds/_helpers";
import { deleteObjectQuietly, getS3 } from "@/adapters/storage/s3";
import { getEnv } from "@/lib/env";
import { AppError } from "@/lib/errors";
import { acceptedAttachmentType, checkAttachmentHead, safeFilename } from "@/lib/finishing/attachments";
import { ATTACHMENT_MAX_BYTES } from "@/lib/finishing/schemas";
import { CERTIFICATE_PREFIX } from "@/lib/inventory/certificate";
import { certificateQuerySchema } from "@/lib/inventory/schemas";

/** The name the browser sent, %-encoded; a malformed escape is kept as it came rather than refused. */
function decodedName(raw: string | null): string {
  if (!raw) return "";
  try {
    return decodeURIComponent(raw).trim();
  } catch {
    return raw.trim();
  }
}

// GET /api/inventory/lots/[id]/certificate – the lot's certificate of analysis, streamed from object storage (every role)
export async function GET(req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const id = await readId(ctx, "Feedstock lot");
    const file = await findLotCertificate(getDb(), id);
    if (!file) throw new AppError("not_found", "No certificate of analysis is attached to this lot.");
    return await storedFileResponse(req, file, { what: "certificate", cache: "private, max-age=3600" });
  } catch (err) {
    return toErrorResponse(err);
  }
}

// POST /api/inventory/lots/[id]/certificate – attach (or replace) the certificate of analysis: the raw file as the body, its type in
// Content-Type (PDF, JPEG, PNG, WebP), its name in x-filename, optionally ?version= of the lot as loaded (technician, manager, admin)
export async function POST(req: Request, ctx: IdContext) {
  let upload: SpooledUpload | null = null;
  let storedKey: string | null = null;
  try {
    const user = await requireUser("inventory:write");
    const id = await readId(ctx, "Feedstock lot");
    const { version } = certificateQuerySchema.parse(Object.fromEntries(new URL(req.url).searchParams));
    const db = getDb();
    const lot = await getLotOrThrow(db, id);
    const filename = safeFilename(decodedName(req.headers.get("x-filename")) || "certificate");
    // Type and size are refused before the body is read: 415, then 413 on the declared length.
    const declared = req.headers.get("content-type") ?? "";
    acceptedAttachmentType(declared, filename);
    upload = await spoolUpload(req, {
      maxBytes: ATTACHMENT_MAX_BYTES,
      keepBytes: 0,
      tooLarge: () => new AppError("payload_too_large", `Certificates are limited to ${ATTACHMENT_MAX_BYTES / 1024 / 1024} MB.`, { file: ["too large"] }),
    });
    const contentType = checkAttachmentHead(upload.head, upload.size, declared, filename);
    const env = getEnv();
    const key = `${CERTIFICATE_PREFIX}${lot.id}/${randomUUID()}-${filename}`;
    // Stored before the row, outside any transaction: a store that hangs holds this request
    // only, never a database connection. A row that fails to commit takes the object back out.
    storedKey = key;
    try {
      await getS3().send(new PutObjectCommand({ Bucket: env.S3_BUCKET, Key: key, Body: upload.open(), ContentLength: upload.size, ContentType: contentType }));
    } catch (err) {
      console.error("[storage] put failed:", err instanceof Error ? err.message : err);
      throw new AppError("unavailable", "File storage did not answer; nothing was stored. Try again in a moment.");
    }
    const result = await attachCertificate(db, lot.id, { bucket: env.S3_BUCKET, object_key: key, filename, content_type: contentType, size_bytes: upload.size, sha256: upload.sha256 }, user.id, version);
    storedKey = null;
    if (result.replaced) await deleteObjectQuietly(result.replaced.bucket, result.replaced.object_key);
    return NextResponse.json({ lot: result.lot, file: result.file }, { status: 201 });
  } catch (err) {
    if (storedKey) await deleteObjectQuietly(getEnv().S3_BUCKET, storedKey);
    return toErrorResponse(err);
  } finally {
    await upload?.dispose();
  }
}
