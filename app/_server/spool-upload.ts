import { createHash, randomUUID } from "node:crypto";
import { createReadStream, createWriteStream, type ReadStream } from "node:fs";
import { rm } from "node:fs/promises";
import os from "node:os";
import path from "node:path";
import { once } from "node:events";

// An upload is written to a temporary file as it arrives, never gathered in memory whole:
// ten 50 MB uploads at once would otherwise hold half a gigabyte of buffers and stall every
// other request behind the garbage collector. The size limit, the SHA-256 and the first and
// last bytes are taken on the way; a body small enough to parse is also kept in memory.

const HEAD_BYTES = 4096;
const TAIL_BYTES = 1024;

export type SpooledUpload = {
  size: number;
  sha256: string;
  head: Uint8Array;
  tail: Uint8Array;
  /** The whole body when it is at most `keepBytes`, else null. */
  bytes: Uint8Array | null;
  /** A fresh stream over the stored body, for the object store. */
  open: () => ReadStream;
  dispose: () => Promise<void>;
};

export async function spoolUpload(req: Request, opts: { maxBytes: number; keepBytes: number; tooLarge: () => Error }): Promise<SpooledUpload> {
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > opts.maxBytes) throw opts.tooLarge();
  return spoolChunks(webChunks(req.body), opts);
}

/**
 * Writes any stream of chunks (a raw request body, one file of a multipart form) to a temporary
 * file, refusing with `tooLarge()` the moment it passes `maxBytes`; nothing is left on disk then.
 */
export async function spoolChunks(chunks: AsyncIterable<Uint8Array>, opts: { maxBytes: number; keepBytes: number; tooLarge: () => Error }): Promise<SpooledUpload> {
  const file = path.join(os.tmpdir(), `hearth-upload-${randomUUID()}`);
  const dispose = () => rm(file, { force: true });
  const out = createWriteStream(file, { mode: 0o600 });
  const hash = createHash("sha256");
  const kept: Uint8Array[] = [];
  let keeping = true;
  let size = 0;
  let head: Uint8Array = new Uint8Array(0);
  let tail: Uint8Array = new Uint8Array(0);
  try {
    for await (const value of chunks) {
      size += value.byteLength;
      // Leaving the loop early ends the source (its reader is cancelled, its stream destroyed).
      if (size > opts.maxBytes) throw opts.tooLarge();
      hash.update(value);
      if (head.length < HEAD_BYTES) head = concat(head, value.subarray(0, HEAD_BYTES - head.length));
      tail = value.byteLength >= TAIL_BYTES ? value.slice(value.byteLength - TAIL_BYTES) : concat(tail, value).slice(-TAIL_BYTES);
      if (keeping) {
        if (size <= opts.keepBytes) kept.push(value);
        else {
          keeping = false;
          kept.length = 0;
        }
      }
      // Back-pressure: the client waits while the disk catches up.
      if (!out.write(value)) await once(out, "drain");
    }
    out.end();
    await once(out, "finish");
  } catch (err) {
    out.destroy();
    await dispose();
    throw err;
  }
  return {
    size,
    sha256: hash.digest("hex"),
    head,
    tail,
    bytes: keeping ? concat(...kept) : null,
    open: () => createReadStream(file),
    dispose,
  };
}

async function* webChunks(body: ReadableStream<Uint8Array> | null): AsyncGenerator<Uint8Array> {
  if (!body) return;
  const reader = body.getReader();
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) return;
      yield value;
    }
  } finally {
    await reader.cancel().catch(() => {});
  }
}

function concat(...parts: Uint8Array[]): Uint8Array {
  if (parts.length === 1) return parts[0];
  const out = new Uint8Array(parts.reduce((n, p) => n + p.byteLength, 0));
  let at = 0;
  for (const p of parts) {
    out.set(p, at);
    at += p.byteLength;
  }
  return out;
}
