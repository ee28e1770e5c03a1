// One test for "is this a row id": the canonical 8-4-4-4-12 hex form of a UUID (RFC 9562 §4).
// PostgreSQL's uuid input refuses other shapes with SQLSTATE 22P02, so a string that fails here
// names nothing and is answered as "not found" or "invalid" before any query runs.

export const UUID_PATTERN = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export function isUuid(value: unknown): value is string {
  return typeof value === "string" && UUID_PATTERN.test(value);
}
