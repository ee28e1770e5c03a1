import { describe, expect, it } from "vitest";
import { safeNextPath } from "@/lib/http/safe-next";

// WHATWG URL Standard: "\" is a path separator in special schemes, and tab, LF and CR are
// removed from the input before parsing, so each of these leads a browser to another host.
describe("the way back after sign-in", () => {
  it.each([
    "//evil.example/",
    "/\\evil.example/",
    "/%5Cevil.example/",
    "/%5cevil.example/",
    "/\t/evil.example/",
    "/%09/evil.example/",
    "/\n/evil.example/",
    "/%0A/evil.example/",
    "/%0d/evil.example/",
    "\\\\evil.example",
    "https://evil.example/",
    "javascript:alert(1)",
    "evil.example",
    "",
    "/\u0000x",
  ])("refuses %j", (next) => {
    expect(safeNextPath(next)).toBe("");
  });

  it("refuses what is not a string", () => {
    expect(safeNextPath(undefined)).toBe("");
    expect(safeNextPath(["/floor"])).toBe("");
  });

  it("keeps same-origin paths with their query and fragment", () => {
    expect(safeNextPath("/floor")).toBe("/floor");
    expect(safeNextPath("/parts?order=A%2F1&page=2#units")).toBe("/parts?order=A%2F1&page=2#units");
    expect(safeNextPath("/")).toBe("/");
  });

  it("and the browser agrees: every accepted value resolves to this origin", () => {
    for (const next of ["/floor", "/a/../b", "/%2e%2e/x", "/@evil.example"]) {
      const kept = safeNextPath(next);
      if (kept) expect(new URL(kept, "https://shop.example").origin).toBe("https://shop.example");
    }
  });
});
