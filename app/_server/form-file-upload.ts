import { Readable, Transform } from "node:stream";
import busboy from "busboy";
import { AppError } from "@/lib/errors";
import { spoolChunks, type SpooledUpload } from "@/app/_server/spool-upload";

// One file out of a multipart/form-data body, parsed by busboy as the body arrives and written
// to a temporary file (spool-upload.ts): the form is never gathered in memory whole, so a
// phone's 15 MB photo costs a few chunks of buffer, not 15 MB (twice over, as the platform's
// own form parser holds the body and then the file).

/** The multipart boundary lines and part headers around the file: allowed on top of its own limit. */
const ENVELOPE_BYTES = 64 * 1024;

export type FormFileUpload = SpooledUpload & { filename: string; mimeType: string };

export type FormFileOptions = {
  /** The form field that carries the file. */
  field: string;
  maxBytes: number;
  tooLarge: () => Error;
  /** Called with the part's declared type and name before its bytes are read; throws to refuse (e.g. 415). */
  accept?: (mimeType: string, filename: string) => void;
};

/**
 * Spools the file in `field` and resolves once the whole form has been read. Refused, with nothing
 * left on disk: a declared Content-Length over the limit before reading (413); a file that passes
 * the limit as it arrives (413, also when sent chunked); a body that is not a well-formed form or
 * holds no such file (400 naming the field); whatever `accept` throws. The caller disposes of the
 * result.
 */
export async function spoolFormFile(req: Request, opts: FormFileOptions): Promise<FormFileUpload> {
  const { field } = opts;
  const notAForm = () => new AppError("bad_request", `Send the file as multipart/form-data in a field named "${field}".`, { [field]: ["not a multipart form"] });
  const contentType = req.headers.get("content-type") ?? "";
  const maxBody = opts.maxBytes + ENVELOPE_BYTES;
  const declared = Number(req.headers.get("content-length") ?? "NaN");
  if (Number.isFinite(declared) && declared > maxBody) throw opts.tooLarge();
  if (!/^multipart\/form-data\s*;/i.test(contentType) || !req.body) throw notAForm();
  let parser: busboy.Busboy;
  try {
    // fileSize one past the limit, so that the spool sees the overflow and refuses with the one rule.
    parser = busboy({ headers: { "content-type": contentType }, limits: { fileSize: opts.maxBytes + 1, files: 4, fields: 50, fieldSize: 64 * 1024, parts: 60, headerPairs: 20 } });
  } catch {
    throw notAForm(); // no boundary, or a malformed header
  }

  const source = Readable.fromWeb(req.body as import("node:stream/web").ReadableStream<Uint8Array>);
  let bodyBytes = 0;
  // The whole body is counted too: a form of many small parts is cut off as well.
  const counter = new Transform({
    transform(chunk: Buffer, _enc, done) {
      bodyBytes += chunk.byteLength;
      if (bodyBytes > maxBody) done(opts.tooLarge());
      else done(null, chunk);
    },
  });

  return await new Promise<FormFileUpload>((resolve, reject) => {
    let spooling: Promise<SpooledUpload> | null = null;
    let part: { filename: string; mimeType: string } | null = null;
    let settled = false;

    const fail = (err: unknown) => {
      if (settled) return;
      settled = true;
      // Stop reading, but leave the request itself alone: destroying it would take the socket
      // down before the answer is out (the client sees EPIPE, not the 413). scripts/serve.ts
      // closes such a connection after the answer, dropping the rest of the body.
      source.unpipe(counter);
      counter.unpipe(parser);
      source.pause();
      parser.removeAllListeners("file");
      // A file half spooled is removed once its writer has stopped.
      spooling?.then((u) => u.dispose(), () => undefined);
      reject(err instanceof AppError ? err : notAForm());
    };

    parser.on("file", (name, stream, info) => {
      if (name !== field || spooling) {
        stream.resume(); // another part, or a second file: read past it
        return;
      }
      part = { filename: info.filename ?? "", mimeType: info.mimeType ?? "" };
      try {
        opts.accept?.(part.mimeType, part.filename);
      } catch (err) {
        stream.resume();
        fail(err);
        return;
      }
      spooling = spoolChunks(stream, { maxBytes: opts.maxBytes, keepBytes: 0, tooLarge: opts.tooLarge });
      spooling.catch(fail);
    });
    parser.on("field", () => undefined);
    parser.on("error", fail);
    parser.on("close", () => {
      if (settled) return;
      if (!spooling || !part) {
        fail(new AppError("invalid", "Choose a file to attach.", { [field]: [`no file in the field "${field}"`] }));
        return;
      }
      const { filename, mimeType } = part;
      spooling.then(
        (upload) => {
          if (settled) void upload.dispose();
          else {
            settled = true;
            resolve({ ...upload, filename, mimeType });
          }
        },
        fail,
      );
    });
    source.on("error", fail);
    counter.on("error", fail);
    source.pipe(counter).pipe(parser);
  });
}
