import { GetObjectCommand } from "@aws-sdk/client-s3";
import { getDb } from "@/db/client";
import { getFileOrThrow } from "@/db/files/reads";
import { requireUser } from "@/app/_server/session";
import { AppError } from "@/lib/errors";
import { toErrorResponse } from "@/app/_server/errors";
import { getS3 } from "@/adapters/storage/s3";
import { readId, type IdContext } from "@/app/api/builds/_helpers";

// GET /api/files/[id]/content – the stored bytes (the 3-D preview reads the STL through this) (every role)
export async function GET(_req: Request, ctx: IdContext) {
  try {
    await requireUser("shop:read");
    const f = await getFileOrThrow(getDb(), await readId(ctx, "File"));
    let body: Uint8Array;
    try {
      const res = await getS3().send(new GetObjectCommand({ Bucket: f.bucket, Key: f.object_key }));
      body = await res.Body!.transformToByteArray();
    } catch {
      throw new AppError("unavailable", "File storage did not return the file; try again in a moment.");
    }
    return new Response(Buffer.from(body), {
      headers: {
        "content-type": f.content_type,
        "content-length": String(body.byteLength),
        "content-disposition": `inline; filename="${f.filename.replace(/[^\w.-]/g, "_")}"`,
        "cache-control": "private, max-age=3600, immutable",
      },
    });
  } catch (err) {
    return toErrorResponse(err);
  }
}
