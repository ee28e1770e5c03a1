import { NextResponse } from "next/server";
import { ZodError, z } from "zod";
import { AppError, isUnavailableError } from "@/lib/errors";
import { appErrorFromDatabase } from "@/lib/db-errors";
import { getEnv } from "@/lib/env";
import { checkJsonShape, isJsonContentType } from "@/lib/http/json-body";

// Seconds a client (or a load balancer) is asked to wait before trying again after a 503.
export const RETRY_AFTER_SECONDS = 5;

export type ErrorBody = { error: { code: string; message: string; fieldErrors?: Record<string, string[]>; details?: unknown } };

function appErrorResponse(err: AppError): NextResponse<ErrorBody> {
  return NextResponse.json(
    { error: { code: err.code, message: err.message, fieldErrors: err.fieldErrors, details: err.details } },
    { status: err.status, headers: err.status === 503 ? { "retry-after": String(RETRY_AFTER_SECONDS) } : undefined },
  );
}

/** One place that turns a thrown error into the API's error body and status. */
export function toErrorResponse(err: unknown): NextResponse<ErrorBody> {
  if (err instanceof ZodError) {
    const flat = z.flattenError(err);
    const fieldErrors: Record<string, string[]> = {};
    for (const issue of err.issues) {
      const key = issue.path.length ? issue.path.join(".") : "_";
      (fieldErrors[key] ??= []).push(issue.message);
    }
    const first = err.issues[0];
    const where = first?.path.length ? `${first.path.join(".")}: ` : "";
    return NextResponse.json(
      { error: { code: "invalid", message: `${where}${first?.message ?? "invalid input"}`, fieldErrors, details: flat.formErrors.length ? { formErrors: flat.formErrors } : undefined } },
      { status: 422 },
    );
  }
  if (err instanceof AppError) return appErrorResponse(err);
  // The database is down, restarting or out of connections: the request was fine, so a 503
  // that says when to try again, not a 500.
  if (isUnavailableError(err)) {
    console.error("[api] a service is unavailable:", err instanceof Error ? err.message : err);
    return NextResponse.json(
      { error: { code: "unavailable", message: "The database cannot be reached just now; nothing was changed. Try again in a moment." } },
      { status: 503, headers: { "retry-after": String(RETRY_AFTER_SECONDS) } },
    );
  }
  // Next.js decodes a dynamic path segment when the handler awaits its params; a malformed
  // percent-escape ("%E0%A4%A") throws URIError there. The address is the client's mistake.
  if (err instanceof URIError) return appErrorResponse(new AppError("bad_request", "The address contains a malformed %-escape."));
  // Unique names, out-of-range numbers and dates, NUL bytes: the database refusing a value the
  // request sent is the request's fault (lib/db-errors.ts says which field).
  const fromDb = appErrorFromDatabase(err);
  if (fromDb) return appErrorResponse(fromDb);
  console.error("[api] unexpected error", err);
  return NextResponse.json({ error: { code: "internal", message: "Something went wrong on our side; nothing was changed." } }, { status: 500 });
}

/** Reads the body's bytes, refusing more than `max` before reading the rest (413). */
async function readCapped(req: Request, max: number): Promise<string> {
  const tooLarge = () => new AppError("payload_too_large", `The request body is larger than ${max} bytes.`, undefined, { max_bytes: max });
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > max) throw tooLarge();
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let size = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    size += value.byteLength;
    if (size > max) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge();
    }
    chunks.push(value);
  }
  return new TextDecoder().decode(Buffer.concat(chunks));
}

/**
 * Reads a JSON body: application/json only (415), at most JSON_MAX_BYTES (413), valid JSON (400),
 * no deeper than a form could send and no NUL byte in any text (422). Never a 500.
 */
export async function readJson(req: Request, opts: { maxBytes?: number } = {}): Promise<unknown> {
  const text = await readCapped(req, opts.maxBytes ?? getEnv().JSON_MAX_BYTES);
  if (!text.trim()) return {};
  if (!isJsonContentType(req.headers.get("content-type"))) {
    throw new AppError("unsupported_media_type", "Send the body as JSON with Content-Type: application/json.", undefined, { expected: "application/json" });
  }
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
  const problem = checkJsonShape(value);
  if (problem) throw new AppError(problem.code, problem.message, problem.field ? { [problem.field]: [problem.reason] } : undefined);
  return value;
}
