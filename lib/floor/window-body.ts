// One floor window's response body, encoded once per load and shared by every poll until the
// window's stamp moves: the UTF-8 bytes, and their gzip form made on the first request that
// accepts it (the JSON shrinks about tenfold, and compressing 200 kB per poll would cost more
// than answering it).
import { gzipSync } from "node:zlib";

export class WindowBody {
  private zipped?: Buffer;

  constructor(readonly raw: Buffer) {}

  static fromJson(json: string): WindowBody {
    return new WindowBody(Buffer.from(json, "utf8"));
  }

  get gzip(): Buffer {
    return (this.zipped ??= gzipSync(this.raw));
  }

  /** The bytes to send and the headers that describe them. */
  encoded(gzip: boolean): { bytes: Buffer; headers: Record<string, string> } {
    const bytes = gzip ? this.gzip : this.raw;
    const headers: Record<string, string> = {
      "content-type": "application/json",
      "cache-control": "no-store",
      "content-length": String(bytes.length),
      vary: "Accept-Encoding",
    };
    if (gzip) headers["content-encoding"] = "gzip";
    return { bytes, headers };
  }
}
