import { AppError } from "@/lib/errors";
import { readCappedBody } from "./capped-body";

// Shared by every STL upload (a part's geometry, a quote line's model).

// Browsers and CAD tools label STL files in many ways; none of these can carry anything else.
export const STL_TYPES = new Set(["", "application/octet-stream", "model/stl", "model/x.stl-binary", "model/x.stl-ascii", "application/sla", "application/vnd.ms-pki.stl", "text/plain"]);

/** An uploaded file's bytes, refused past the upload limit (413 on the file field). */
export async function readLimited(req: Request, max: number): Promise<Uint8Array> {
  const tooLarge = () => new AppError("payload_too_large", `The file is larger than the ${Math.round(max / 1024 / 1024)} MB upload limit.`, { file: ["over the size limit"] });
  return readCappedBody(req, max, tooLarge);
}

