// Errors shared by the web app, the worker and the pure computations. Worker-safe: no next/*.

export type ErrorCode =
  | "bad_request" // 400: the body is not JSON or not the expected shape
  | "unauthenticated" // 401
  | "forbidden" // 403
  | "not_found" // 404
  | "conflict" // 409: stale version, overlapping booking, a state that moved on
  | "payload_too_large" // 413
  | "unsupported_media_type" // 415
  | "invalid" // 422: well-formed but breaks a rule of the domain
  | "too_many_requests" // 429
  | "unavailable"; // 503

const STATUS: Record<ErrorCode, number> = {
  bad_request: 400,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  payload_too_large: 413,
  unsupported_media_type: 415,
  invalid: 422,
  too_many_requests: 429,
  unavailable: 503,
};

export type FieldErrors = Record<string, string[]>;

export class AppError extends Error {
  readonly status: number;
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly fieldErrors?: FieldErrors,
    readonly details?: Record<string, unknown>,
  ) {
    super(message);
    this.name = "AppError";
    this.status = STATUS[code];
  }
}

/**
 * An input the computation cannot give a meaningful answer for (negative size, shrinkage
 * outside (0, 0.5), a mesh that is not closed...). Thrown instead of returning NaN or clamping.
 */
export class ComputationError extends AppError {
  constructor(
    message: string,
    readonly field?: string,
    details?: Record<string, unknown>,
  ) {
    super("invalid", message, field ? { [field]: [message] } : undefined, details);
    this.name = "ComputationError";
  }
}

export function isAppError(err: unknown): err is AppError {
  return err instanceof AppError;
}
