import { getDb } from "@/db/client";
import { findInspectionFile } from "@/db/inspections/reads";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";
import { storedFileResponse } from "@/app/_server/stored-file";

// GET /api/inspections/[id]/files/[fileId] – an inspection's attachment from object storage (every role)
export async function GET(req: Request, { params }: { params: Promise<{ id: string; fileId: string }> }) {
  try {
    await requireUser("shop:read");
    const { id, fileId } = await params;
    const file = await findInspectionFile(getDb(), id, fileId);
    if (!file) throw new AppError("not_found", "Attachment not found.");
    return await storedFileResponse(req, file, { what: "attachment", cache: "private, max-age=3600" });
  } catch (err) {
    return toErrorResponse(err);
  }
}
