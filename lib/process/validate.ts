import type { z } from "zod";
import { ComputationError } from "@/lib/errors";

/**
 * Parses a computation's input with its zod schema and turns the first issue into a
 * ComputationError, so callers see one error type whether the shape or the domain is wrong.
 */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown, what: string): z.output<S> {
  const result = schema.safeParse(input);
  if (result.success) return result.data;
  const issue = result.error.issues[0];
  const field = issue.path.map(String).join(".");
  throw new ComputationError(
    `${what}: ${field ? `${field}: ` : ""}${issue.message}`,
    field || undefined,
    { issues: result.error.issues },
  );
}

/** A finite number or a ComputationError naming the field (for hot paths that skip zod). */
export function requireFinite(value: number, field: string): number {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new ComputationError(`${field} must be a finite number (got ${String(value)})`, field);
  }
  return value;
}

export function requirePositive(value: number, field: string): number {
  requireFinite(value, field);
  if (value <= 0) throw new ComputationError(`${field} must be greater than 0 (got ${value})`, field);
  return value;
}

export function requireNonNegative(value: number, field: string): number {
  requireFinite(value, field);
  if (value < 0) throw new ComputationError(`${field} must not be negative (got ${value})`, field);
  return value;
}

/** Guards results: a computation that would return NaN or ±Infinity throws instead. */
export function finiteResult(value: number, what: string): number {
  if (!Number.isFinite(value)) {
    throw new ComputationError(`${what} is not a finite number; check the inputs`, undefined, { value });
  }
  return value;
}

export function requireValidDate(value: Date, field: string): Date {
  if (!(value instanceof Date) || Number.isNaN(value.getTime())) {
    throw new ComputationError(`${field} must be a valid date`, field);
  }
  return value;
}
