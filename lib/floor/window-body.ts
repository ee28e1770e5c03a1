// One shared read's response body (the floor's window, the board, …), encoded once per load and
// shared by every request until the read's stamp moves: the UTF-8 bytes, their gzip form made on
// the first request that accepts it (the JSON shrinks about tenfold, and compressing 200 kB per
// request would cost more than answering it), and an entity tag over the bytes, so that a browser
// that already holds this answer gets 304 Not Modified and no body (RFC 9110 §8.8.3, §13.1.2).
import { createHash } from "node:crypto";
import { promisify } from "node:util";
import { gzip as gzipCallback, gzipSync } from "node:zlib";

const gzipAsync = promisify(gzipCallback);

/**
 * Stored by the browser but asked again every time (RFC 9111 §5.2.2.4 no-cache): the answer is
 * never reused without the server's say-so, and "private" keeps shared caches out.
 */
export const SHARED_READ_CACHE_CONTROL = "private, no-cache";

export class WindowBody {
  private zipped?: Buffer;
  private tag?: string;

  constructor(readonly raw: Buffer) {}

  static fromJson(json: string): WindowBody {
    return new WindowBody(Buffer.from(json, "utf8"));
  }

  /**
   * A body with its gzip form made on libuv's thread pool, off the event loop: a cache's load
   * hands every waiting request a body ready to send, where the first of them would otherwise
   * compress it (a board of 200 kB: several milliseconds under load) while the rest waited.
   */
  static async ready(json: string): Promise<WindowBody> {
    const body = WindowBody.fromJson(json);
    body.zipped = await gzipAsync(body.raw);
    return body;
  }

  get gzip(): Buffer {
    return (this.zipped ??= gzipSync(this.raw));
  }

  /** A weak tag (W/): the same JSON is sent plain or gzipped, equal in meaning, not in bytes. */
  get etag(): string {
    return (this.tag ??= `W/"${createHash("sha256").update(this.raw).digest("base64url").slice(0, 32)}"`);
  }

  /** If-None-Match names this body (weak comparison, RFC 9110 §13.1.2; "*" matches any). */
  notModified(ifNoneMatch: string | null | undefined): boolean {
    if (!ifNoneMatch) return false;
    const mine = this.etag.slice(2);
    return ifNoneMatch.split(",").some((t) => {
      const tag = t.trim();
      return tag === "*" || (tag.startsWith("W/") ? tag.slice(2) : tag) === mine;
    });
  }

  /** The headers of a 304 for this body. */
  get notModifiedHeaders(): Record<string, string> {
    return { etag: this.etag, "cache-control": SHARED_READ_CACHE_CONTROL, vary: "Accept-Encoding" };
  }

  /** The bytes to send and the headers that describe them. */
  encoded(gzip: boolean): { bytes: Buffer; headers: Record<string, string> } {
    const bytes = gzip ? this.gzip : this.raw;
    const headers: Record<string, string> = {
      "content-type": "application/json",
      "cache-control": SHARED_READ_CACHE_CONTROL,
      "content-length": String(bytes.length),
      etag: this.etag,
      vary: "Accept-Encoding",
    };
    if (gzip) headers["content-encoding"] = "gzip";
    return { bytes, headers };
  }
}
