import { describe, expect, it } from "vitest";
import { isUnavailableError } from "@/lib/errors";

// SQLSTATE codes from the PostgreSQL documentation, Appendix A "PostgreSQL Error Codes":
// class 08 connection exception, 57P01 admin_shutdown, 57P02 crash_shutdown, 57P03 cannot_connect_now.
describe("isUnavailableError", () => {
  it("is true for refused and dropped connections and a server shutting down or starting", () => {
    for (const code of ["ECONNREFUSED", "ECONNRESET", "ETIMEDOUT", "57P01", "57P02", "57P03", "08000", "08003", "08006", "08001"]) {
      expect(isUnavailableError(Object.assign(new Error("x"), { code })), code).toBe(true);
    }
    expect(isUnavailableError(new Error("timeout exceeded when trying to connect"))).toBe(true);
    expect(isUnavailableError(new Error("Connection terminated unexpectedly"))).toBe(true);
    // Node reports a refused dual-stack connect as an AggregateError of both attempts.
    expect(isUnavailableError(new AggregateError([Object.assign(new Error("a"), { code: "ECONNREFUSED" })], "connect"))).toBe(true);
    expect(isUnavailableError(new Error("wrapped", { cause: Object.assign(new Error("x"), { code: "57P01" }) }))).toBe(true);
  });

  it("is false for errors of the request itself", () => {
    for (const code of ["23505", "23P01", "40001", "22P02", "42P01", "57014"]) {
      expect(isUnavailableError(Object.assign(new Error("x"), { code })), code).toBe(false);
    }
    expect(isUnavailableError(new Error("something else"))).toBe(false);
    expect(isUnavailableError(null)).toBe(false);
    expect(isUnavailableError("ECONNREFUSED")).toBe(false);
  });
});
