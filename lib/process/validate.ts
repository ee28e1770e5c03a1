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

export function requireValidDate(value: Date, field: string): Date {
  if (!(value instanceof Date) || Number.isNaN(value.getTime())) {
    throw new ComputationError(`${field} must be a valid date`, field);
  }
  return value;
}
