// AppError across two copies of lib/errors.ts: the web server and the Next.js bundle each load
// their own in one process and share one cache of loads, so an error made by one copy must be
// recognised by the other (else a 404 becomes a 500).
import { describe, expect, it, vi } from "vitest";

describe("AppError across module copies", () => {
  it("an AppError from another copy of the module is an AppError here, with its status", async () => {
    const first = await import("@/lib/errors");
    vi.resetModules();
    const second = await import("@/lib/errors");
    expect(second.AppError).not.toBe(first.AppError);
    const err = new second.AppError("not_found", "Unit not found.");
    expect(err instanceof first.AppError).toBe(true);
    expect(first.isAppError(err)).toBe(true);
    expect((err as InstanceType<typeof first.AppError>).status).toBe(404);
  });

  it("plain errors and look-alikes are not AppErrors; subclasses keep their own check", async () => {
    const { AppError, ComputationError } = await import("@/lib/errors");
    expect(new Error("x") instanceof AppError).toBe(false);
    expect({ code: "not_found", status: 404, name: "AppError" } instanceof AppError).toBe(false);
    expect((null as unknown as object) instanceof AppError).toBe(false);
    expect(new ComputationError("bad", "x") instanceof AppError).toBe(true);
    expect(new AppError("invalid", "bad") instanceof ComputationError).toBe(false);
    expect(new ComputationError("bad", "x") instanceof ComputationError).toBe(true);
  });
});
