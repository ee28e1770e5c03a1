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

// One process holds two copies of this module: the web server's own (scripts/serve.ts, which
// answers the shared reads directly) and the one Next.js bundled into the route handlers. They
// share one cache of loads (lib/floor/window-cache.ts), so a route handler can receive an
// AppError made by the other copy, which a plain `instanceof` does not recognise and would turn
// into a 500. A brand registered process-wide (Symbol.for) is recognised by both copies.
const APP_ERROR = Symbol.for("hearth.app-error");

export class AppError extends Error {
  readonly status: number;
  readonly [APP_ERROR] = true;

  static [Symbol.hasInstance](value: unknown): boolean {
    // Subclasses (ComputationError) keep the ordinary prototype check.
    if (this !== AppError) return Function.prototype[Symbol.hasInstance].call(this, value);
    return typeof value === "object" && value !== null && (value as { [APP_ERROR]?: unknown })[APP_ERROR] === true;
  }

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

// Network errors of a connection that could not be made or was lost (Node's net and dns).
const CONNECTION_CODES = new Set(["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "EPIPE", "ENOTFOUND", "EAI_AGAIN", "EHOSTUNREACH", "ENETUNREACH"]);
// What node-postgres says when a pool cannot hand out a connection or a client lost its server.
const CONNECTION_MESSAGES = [/timeout exceeded when trying to connect/i, /connection terminated/i, /is not queryable/i, /Connection ended unexpectedly/i];

/**
 * Whether an error means the database (or another service) cannot be reached right now rather
 * than that the request was wrong: a refused or dropped connection, a server shutting down or
 * starting (SQLSTATE 57P01 admin_shutdown, 57P02 crash_shutdown, 57P03 cannot_connect_now), or
 * any class 08 connection exception (PostgreSQL documentation, Appendix A, "PostgreSQL Error Codes").
 */
export function isUnavailableError(err: unknown, depth = 0): boolean {
  if (!err || typeof err !== "object" || depth > 3) return false;
  const { code, message, errors, cause } = err as { code?: unknown; message?: unknown; errors?: unknown; cause?: unknown };
  if (typeof code === "string" && (CONNECTION_CODES.has(code) || code === "57P01" || code === "57P02" || code === "57P03" || code.startsWith("08"))) return true;
  if (typeof message === "string" && CONNECTION_MESSAGES.some((re) => re.test(message))) return true;
  if (Array.isArray(errors) && errors.some((e) => isUnavailableError(e, depth + 1))) return true;
  return isUnavailableError(cause, depth + 1);
}
