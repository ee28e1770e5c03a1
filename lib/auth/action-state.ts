import { ZodError } from "zod";
import { AppError, type ErrorCode, type FieldErrors } from "@/lib/errors";

/**
 * What a server action returns to its form. `code` mirrors the API's error codes, so that a form
 * can tell "not signed in" (unauthenticated) and "not your role" (forbidden) from a bad field, and
 * so that tests/auth can check an action's permission gate over HTTP just as it checks a route's.
 */
export type ActionState = {
  ok: boolean;
  code?: ErrorCode | "internal";
  message?: string;
  fieldErrors?: FieldErrors;
  /** Changes on every answer, so a form can react to two identical answers in a row. */
  at?: number;
};

export const initialActionState: ActionState = { ok: false };

export function actionSuccess(message: string): ActionState {
  return { ok: true, message, at: Date.now() };
}

/** Turns a thrown error into the form's answer; anything unexpected is rethrown to error.tsx. */
export function actionFailure(err: unknown): ActionState {
  if (err instanceof ZodError) {
    const fieldErrors: FieldErrors = {};
    for (const issue of err.issues) (fieldErrors[issue.path.join(".") || "_"] ??= []).push(issue.message);
    return { ok: false, code: "invalid", message: err.issues[0]?.message ?? "Check the form.", fieldErrors, at: Date.now() };
  }
  if (err instanceof AppError) return { ok: false, code: err.code, message: err.message, fieldErrors: err.fieldErrors, at: Date.now() };
  throw err;
}
