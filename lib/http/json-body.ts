// Rules for a JSON request body that hold before any schema looks at it (used by readJson in
// app/_server/errors.ts). PostgreSQL text cannot hold the NUL character (0x00) at all, so a NUL
// anywhere would reach the database only to fail there; deep nesting only costs the server.

/** "application/json" or a "+json" type such as application/merge-patch+json, any parameters. */
export function isJsonContentType(header: string | null | undefined): boolean {
  if (!header) return false;
  const type = header.split(";")[0].trim().toLowerCase();
  return type === "application/json" || /^application\/[a-z0-9.+-]+\+json$/.test(type);
}

/** Deeper than any form of Hearth sends (the deepest, a sinter profile's steps, is 3). */
export const MAX_JSON_DEPTH = 32;

export type JsonShapeProblem = { code: "bad_request" | "invalid"; message: string; field?: string; reason: string };

export function checkJsonShape(value: unknown, maxDepth = MAX_JSON_DEPTH): JsonShapeProblem | null {
  const stack: Array<{ v: unknown; path: string; depth: number }> = [{ v: value, path: "", depth: 0 }];
  while (stack.length) {
    const { v, path, depth } = stack.pop()!;
    if (typeof v === "string") {
      if (v.includes("\u0000")) return { code: "invalid", message: `${path || "The body"}: text may not contain a NUL character.`, field: path || "_", reason: "contains a NUL character" };
      continue;
    }
    if (!v || typeof v !== "object") continue;
    if (depth >= maxDepth) return { code: "bad_request", message: `The body is nested more than ${maxDepth} levels deep.`, reason: "nested too deep" };
    const entries = Array.isArray(v) ? v.map((x, i) => [String(i), x] as const) : Object.entries(v);
    for (const [k, x] of entries) {
      if (k.includes("\u0000")) return { code: "invalid", message: "A field name contains a NUL character.", field: "_", reason: "field name contains a NUL character" };
      stack.push({ v: x, path: path ? `${path}.${k}` : k, depth: depth + 1 });
    }
  }
  return null;
}
