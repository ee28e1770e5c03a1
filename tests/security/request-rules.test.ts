import { describe, expect, it } from "vitest";
import { crossSiteRefusal, isBearerTokenRequest } from "@/lib/http/cross-site";
import { checkJsonShape, isJsonContentType } from "@/lib/http/json-body";
import { appErrorFromDatabase, violatedFields } from "@/lib/db-errors";
import { INT4_MAX, boundedDate, boundedInstant, multiLine, rowVersion, singleLine } from "@/lib/input-fields";
import { DEFAULT_ORDER_PRIORITY, orderPriorityRefusal } from "@/lib/auth/permissions";
import { baseSecurityHeaders, contentSecurityPolicy } from "@/lib/http/security-headers";

const h = (o: Record<string, string>) => new Headers(o);

describe("cross-site refusal (OWASP CSRF cheat sheet: Origin and Fetch Metadata)", () => {
  const app = "https://shop.example";
  it("lets safe methods and same-origin changes through", () => {
    expect(crossSiteRefusal("GET", h({ origin: "https://evil.example", "sec-fetch-site": "cross-site" }), app)).toBeNull();
    expect(crossSiteRefusal("POST", h({ origin: app, host: "shop.example" }), app)).toBeNull();
    expect(crossSiteRefusal("PATCH", h({ origin: "http://127.0.0.1:3100", host: "127.0.0.1:3100" }), app)).toBeNull();
    expect(crossSiteRefusal("POST", h({ host: "shop.example" }), app)).toBeNull(); // no Origin: not a browser
  });
  it("refuses a foreign origin, a null origin and a cross-site fetch", () => {
    expect(crossSiteRefusal("POST", h({ origin: "https://evil.example", host: "shop.example" }), app)).toMatch(/another site/);
    expect(crossSiteRefusal("DELETE", h({ origin: "https://shop.example.evil.example", host: "shop.example" }), app)).toMatch(/another site/);
    expect(crossSiteRefusal("POST", h({ origin: "null", host: "shop.example" }), app)).toMatch(/without an origin/);
    expect(crossSiteRefusal("PUT", h({ "sec-fetch-site": "cross-site", host: "shop.example" }), app)).toMatch(/another site/);
    expect(crossSiteRefusal("POST", h({ origin: "not a url", host: "shop.example" }), app)).toMatch(/not an address/);
  });
  it("exempts bearer-token requests (the hook for API tokens)", () => {
    expect(isBearerTokenRequest(h({ authorization: "Bearer abc" }))).toBe(true);
    expect(isBearerTokenRequest(h({ authorization: "Basic abc" }))).toBe(false);
    expect(crossSiteRefusal("POST", h({ origin: "https://evil.example", authorization: "Bearer abc", host: "shop.example" }), app)).toBeNull();
  });
});

describe("JSON body rules", () => {
  it("takes application/json and +json types only", () => {
    expect(isJsonContentType("application/json; charset=utf-8")).toBe(true);
    expect(isJsonContentType("application/merge-patch+json")).toBe(true);
    expect(isJsonContentType("text/plain")).toBe(false);
    expect(isJsonContentType(null)).toBe(false);
  });
  it("refuses NUL anywhere and nesting deeper than 32", () => {
    expect(checkJsonShape({ a: [{ b: "x\u0000y" }] })).toMatchObject({ code: "invalid", field: "a.0.b" });
    expect(checkJsonShape({ ["k\u0000"]: 1 })).toMatchObject({ code: "invalid" });
    let deep: unknown = 1;
    for (let i = 0; i < 40; i++) deep = [deep];
    expect(checkJsonShape(deep)).toMatchObject({ code: "bad_request" });
    expect(checkJsonShape({ notes: "line\nline\ttab", n: 1, ok: true, none: null })).toBeNull();
  });
});

describe("database errors that are the request's fault (PostgreSQL 15 manual, Appendix A)", () => {
  it("names the field of a unique violation from the key or the constraint", () => {
    expect(violatedFields({ detail: "Key (name)=(P1) already exists.", constraint: "printers_name_key", table: "printers" })).toEqual(["name"]);
    expect(violatedFields({ constraint: "printers_name_key", table: "printers" })).toEqual(["name"]);
    expect(violatedFields({ detail: "Key (lower(email))=(a@b) already exists." })).toEqual(["email"]);
    const e = appErrorFromDatabase({ code: "23505", constraint: "materials_code_key", table: "materials" })!;
    expect(e.status).toBe(409);
    expect(e.fieldErrors).toEqual({ code: ["this code is taken"] });
  });
  it.each(["22P02", "22003", "22007", "22008", "22021"])("maps data exception %s to 422", (code) => {
    expect(appErrorFromDatabase({ code })?.status).toBe(422);
  });
  it("leaves the server's own errors alone", () => {
    expect(appErrorFromDatabase({ code: "53300" })).toBeNull();
    expect(appErrorFromDatabase(new Error("x"))).toBeNull();
  });
});

describe("bounded input fields", () => {
  it("refuses control characters; notes keep tabs and line breaks", () => {
    expect(singleLine().safeParse("Printer\u00001").success).toBe(false);
    expect(singleLine().safeParse("a\tb").success).toBe(false);
    expect(multiLine().safeParse("first\r\nsecond\tthird").success).toBe(true);
    expect(multiLine().safeParse("x\u0000").success).toBe(false);
    expect(multiLine().safeParse("x\u001b[2J").success).toBe(false);
  });
  it("keeps versions within int4 and dates within 1900-2200", () => {
    expect(rowVersion().safeParse(INT4_MAX).success).toBe(true);
    expect(rowVersion().safeParse(2147483648).success).toBe(false);
    expect(boundedInstant().safeParse("2027-01-04T06:00:00Z").success).toBe(true);
    expect(boundedInstant().safeParse("+294277-01-01T00:00:00Z").success).toBe(false);
    expect(boundedDate().safeParse("294277-01-01").success).toBe(false);
    expect(boundedDate().safeParse("1899-12-31T00:00:00Z").success).toBe(false);
  });
});

describe("order priority: one rule on create, update and import", () => {
  it("a technician may create at the default priority only, and not change it", () => {
    expect(orderPriorityRefusal("technician", DEFAULT_ORDER_PRIORITY)).toBeNull();
    expect(orderPriorityRefusal("technician", 1)).toMatch(/manager or an admin/);
    expect(orderPriorityRefusal("technician", 2, 2)).toBeNull();
    expect(orderPriorityRefusal("technician", 1, 2)).toMatch(/changes/);
    expect(orderPriorityRefusal("manager", 1)).toBeNull();
    expect(orderPriorityRefusal("admin", 5, 1)).toBeNull();
  });
});

describe("security headers", () => {
  it("sends HSTS only for an https APP_URL", () => {
    expect(baseSecurityHeaders("http://127.0.0.1:3000")).not.toHaveProperty("strict-transport-security");
    expect(baseSecurityHeaders("https://shop.example")["strict-transport-security"]).toMatch(/max-age=\d+/);
    expect(baseSecurityHeaders(undefined)["x-content-type-options"]).toBe("nosniff");
  });
  it("admits scripts by nonce only", () => {
    const csp = contentSecurityPolicy("abc");
    expect(csp).toContain("script-src 'self' 'nonce-abc' 'strict-dynamic'");
    expect(csp).not.toMatch(/script-src[^;]*unsafe-inline/);
    expect(csp).toContain("frame-ancestors 'none'");
  });
});
