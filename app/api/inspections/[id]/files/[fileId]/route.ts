import { GetObjectCommand } from "@aws-sdk/client-s3";
import { getDb } from "@/db/client";
import { findInspectionFile } from "@/db/inspections/reads";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";
import { getS3 } from "@/adapters/storage/s3";

// GET /api/inspections/[id]/files/[fileId] – an inspection's attachment from object storage (every role)
export async function GET(_req: Request, { params }: { params: Promise<{ id: string; fileId: string }> }) {
  try {
    await requireUser("shop:read");
    const { id, fileId } = await params;
    const file = await findInspectionFile(getDb(), id, fileId);
    if (!file) throw new AppError("not_found", "Attachment not found.");
    const obj = await getS3().send(new GetObjectCommand({ Bucket: file.bucket, Key: file.object_key }));
    if (!obj.Body) throw new AppError("not_found", "The attachment is missing from storage.");
    const body = obj.Body.transformToWebStream();
    return new Response(body, {
      headers: {
        "content-type": file.content_type,
        "content-length": String(file.size_bytes),
        "content-disposition": `inline; filename="${file.filename}"`,
        "x-content-type-options": "nosniff",
        "cache-control": "private, max-age=3600",
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
