// What a PostgreSQL error says about the request that caused it, as an AppError, or null for an
// error that is the server's own. Pure: the route error mapping (app/_server/errors.ts) and the
// worker can both use it. SQLSTATE codes: PostgreSQL 15 manual, Appendix A "PostgreSQL Error Codes".
import { AppError } from "./errors";

type PgError = { code?: unknown; constraint?: unknown; table?: unknown; detail?: unknown; column?: unknown };

/** Class 22 (data exception) codes an input can cause: the value, not the server, is wrong. */
const DATA_EXCEPTIONS: Record<string, string> = {
  "22P02": "a value is not in the expected form (a number, an id or a date)",
  "22003": "a number is too large or too small to store",
  "22007": "a date or time is not in a form that can be read",
  "22008": "a date or time is outside the range that can be stored",
  "22021": "text contains a character that cannot be stored (such as a NUL byte)",
  "22001": "a text is longer than can be stored",
  "22P05": "text contains a character that cannot be stored",
  "2201B": "a search pattern is not valid",
  "22025": "a search pattern ends with an escape character",
};

/** The columns a unique or foreign-key violation is about: from "Key (a, b)=(…)" or the constraint name. */
export function violatedFields(err: PgError): string[] {
  const detail = typeof err.detail === "string" ? /^Key \((.+?)\)=\(/.exec(err.detail) : null;
  if (detail) return detail[1].split(",").map((c) => c.trim().replace(/^lower\((.*)\)$/, "$1"));
  if (typeof err.constraint === "string") {
    const table = typeof err.table === "string" ? `${err.table}_` : "";
    const bare = err.constraint.startsWith(table) ? err.constraint.slice(table.length) : err.constraint;
    const cols = bare.replace(/_(key|idx|fkey|check|excl|unique)$/, "");
    if (cols) return [cols];
  }
  return typeof err.column === "string" ? [err.column] : ["_"];
}

const human = (field: string) => field.replace(/_id$/, "").replace(/_/g, " ");

export function appErrorFromDatabase(err: unknown): AppError | null {
  if (!err || typeof err !== "object") return null;
  const pg = err as PgError;
  const code = typeof pg.code === "string" ? pg.code : "";
  switch (code) {
    case "23505": {
      const fields = violatedFields(pg);
      const what = fields.map(human).join(" and ");
      const message = `That ${what} is taken already; choose another.`;
      return new AppError("conflict", message, Object.fromEntries(fields.map((f) => [f, [`this ${human(f)} is taken`]])), { constraint: pg.constraint });
    }
    case "23503": {
      const fields = violatedFields(pg);
      return new AppError("invalid", `The ${fields.map(human).join(" and ")} refers to something that does not exist (or is still in use).`, Object.fromEntries(fields.map((f) => [f, ["not found or still in use"]])));
    }
    case "23502": {
      const field = typeof pg.column === "string" ? pg.column : "_";
      return new AppError("invalid", `${human(field)} is required.`, { [field]: ["required"] });
    }
    case "23514":
      return new AppError("invalid", `A value breaks the rule ${typeof pg.constraint === "string" ? `"${pg.constraint}"` : "of this record"}.`);
    case "23P01":
      return new AppError("conflict", "That time is already booked on this resource.");
    case "40001":
    case "40P01":
      return new AppError("conflict", "Someone else changed this at the same moment; reload and try again.");
  }
  if (code in DATA_EXCEPTIONS) return new AppError("invalid", `Not accepted: ${DATA_EXCEPTIONS[code]}.`, undefined, { sqlstate: code });
  return null;
}
