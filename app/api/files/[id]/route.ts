import { NextResponse } from "next/server";
import { getDb } from "@/db/client";
import { getFileOrThrow } from "@/db/files/reads";
import { requireUser } from "@/app/_server/session";
import { toErrorResponse } from "@/app/_server/errors";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/files/[id] – a stored file's status (queued, analysing, done, failed) and analysis (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const f = await getFileOrThrow(getDb(), await readId(ctx, "File"));
    return NextResponse.json({
      file: { id: f.id, kind: f.kind, filename: f.filename, size_bytes: Number(f.size_bytes), sha256: f.sha256, status: f.status, analysis: f.analysis, error: f.error, created_at: f.created_at, updated_at: f.updated_at },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
