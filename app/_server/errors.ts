import { NextResponse } from "next/server";
import { ZodError, z } from "zod";
import { AppError, isUnavailableError } from "@/lib/errors";
import { logger } from "@/adapters/log/logger";
import { currentRequest } from "./request-context";
import { appErrorFromDatabase } from "@/lib/db-errors";
import { getEnv } from "@/lib/env";
import { checkJsonShape, isJsonContentType } from "@/lib/http/json-body";

// Seconds a client (or a load balancer) is asked to wait before trying again after a 503.
export const RETRY_AFTER_SECONDS = 5;

export type ErrorBody = {
  error: { code: string; message: string; fieldErrors?: Record<string, string[]>; details?: unknown; request_id?: string };
};

type Mapped = { status: number; error: ErrorBody["error"] };

/**
 * One place that turns a thrown error into the API's error body and status. The body carries the
 * request's id (also its X-Request-Id header and its log line), so that a user's "something went
 * wrong" leads an operator to the log.
 */
export function toErrorResponse(err: unknown): NextResponse<ErrorBody> {
  const id = currentRequest()?.id;
  const { status, error } = mapError(err, id);
  const headers: Record<string, string> = {};
  if (id) headers["x-request-id"] = id;
  if (status === 503) headers["retry-after"] = String(RETRY_AFTER_SECONDS);
  // RFC 9110 §10.2.3: a 429 that knows the wait says it in Retry-After (seconds).
  const wait = err instanceof AppError && status === 429 ? Number(err.details?.retry_after_s) : NaN;
  if (Number.isFinite(wait) && wait > 0) headers["retry-after"] = String(Math.ceil(wait));
  return NextResponse.json({ error: id ? { ...error, request_id: id } : error }, { status, headers });
}

function mapError(err: unknown, requestId: string | undefined): Mapped {
  if (err instanceof ZodError) {
    const flat = z.flattenError(err);
    const fieldErrors: Record<string, string[]> = {};
    for (const issue of err.issues) {
      const key = issue.path.length ? issue.path.join(".") : "_";
      (fieldErrors[key] ??= []).push(issue.message);
    }
    const first = err.issues[0];
    const where = first?.path.length ? `${first.path.join(".")}: ` : "";
    return {
      status: 422,
      error: { code: "invalid", message: `${where}${first?.message ?? "invalid input"}`, fieldErrors, details: flat.formErrors.length ? { formErrors: flat.formErrors } : undefined },
    };
  }
  if (err instanceof AppError) {
    return { status: err.status, error: { code: err.code, message: err.message, fieldErrors: err.fieldErrors, details: err.details } };
  }
  // The database is down, restarting or out of connections: the request was fine, so a 503
  // that says when to try again, not a 500.
  if (isUnavailableError(err)) {
    logger.error({ req_id: requestId, err: err instanceof Error ? err.message : String(err) }, "a service is unavailable");
    return {
      status: 503,
      error: { code: "unavailable", message: "The database cannot be reached just now; nothing was changed. Try again in a moment." },
    };
  }
  const pgCode = (err as { code?: string } | null)?.code;
  if (pgCode === "23P01") {
    return { status: 409, error: { code: "conflict", message: "That time is already booked on this resource." } };
  }
  if (pgCode === "40001" || pgCode === "40P01") {
    return { status: 409, error: { code: "conflict", message: "Someone else changed this at the same moment; reload and try again." } };
  }
  // Next.js decodes a dynamic path segment when the handler awaits its params; a malformed
  // percent-escape ("%E0%A4%A") throws URIError there. The address is the client's mistake.
  if (err instanceof URIError) return { status: 400, error: { code: "bad_request", message: "The address contains a malformed %-escape." } };
  // Unique names, out-of-range numbers and dates, NUL bytes: the database refusing a value the
  // request sent is the request's fault (lib/db-errors.ts says which field).
  const fromDb = appErrorFromDatabase(err);
  if (fromDb) return { status: fromDb.status, error: { code: fromDb.code, message: fromDb.message, fieldErrors: fromDb.fieldErrors, details: fromDb.details } };
  logger.error({ req_id: requestId, err }, "unexpected error");
  return { status: 500, error: { code: "internal", message: "Something went wrong on our side; nothing was changed." } };
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
