import { NextResponse } from "next/server";
import { ZodError, z } from "zod";
import { AppError } from "@/lib/errors";

export type ErrorBody = { error: { code: string; message: string; fieldErrors?: Record<string, string[]>; details?: unknown } };

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
  if (err instanceof AppError) {
    const res = NextResponse.json(
      { error: { code: err.code, message: err.message, fieldErrors: err.fieldErrors, details: err.details } },
      { status: err.status },
    );
    // RFC 9110 §10.2.3: a 429 that knows the wait says it in Retry-After (seconds).
    const wait = Number(err.details?.retry_after_s);
    if (err.status === 429 && Number.isFinite(wait) && wait > 0) res.headers.set("Retry-After", String(Math.ceil(wait)));
    return res;
  }
  const pgCode = (err as { code?: string } | null)?.code;
  if (pgCode === "23P01") {
    return NextResponse.json({ error: { code: "conflict", message: "That time is already booked on this resource." } }, { status: 409 });
  }
  if (pgCode === "40001" || pgCode === "40P01") {
    return NextResponse.json({ error: { code: "conflict", message: "Someone else changed this at the same moment; reload and try again." } }, { status: 409 });
  }
  console.error("[api] unexpected error", err);
  return NextResponse.json({ error: { code: "internal", message: "Something went wrong on our side; nothing was changed." } }, { status: 500 });
}

/** Reads a JSON body; a body that is not JSON is a 400, never a 500. */
export async function readJson(req: Request): Promise<unknown> {
  const text = await req.text();
  if (!text.trim()) return {};
  try {
    return JSON.parse(text);
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}
