import { AppError } from "@/lib/errors";

// Shared by every STL upload (a part's geometry, a quote line's model).

// Browsers and CAD tools label STL files in many ways; none of these can carry anything else.
export const STL_TYPES = new Set(["", "application/octet-stream", "model/stl", "model/x.stl-binary", "model/x.stl-ascii", "application/sla", "application/vnd.ms-pki.stl", "text/plain"]);

export async function readLimited(req: Request, max: number): Promise<Uint8Array> {
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  const tooLarge = () => new AppError("payload_too_large", `The file is larger than the ${Math.round(max / 1024 / 1024)} MB upload limit.`, { file: ["over the size limit"] });
  if (Number.isFinite(declared) && declared > max) throw tooLarge();
  if (!req.body) return new Uint8Array();
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > max) {
      await reader.cancel().catch(() => {});
      throw tooLarge();
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

