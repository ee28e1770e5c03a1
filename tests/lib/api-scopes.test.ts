import { describe, expect, it } from "vitest";
import {
  API_SCOPES, SESSION_ONLY_PERMISSIONS, actorCan, bearerToken, createApiTokenSchema, hashApiToken, looksLikeApiToken, newApiToken, retryAfterSeconds, scopesAllow, tokenHint, unmappedPermissions,
} from "@/lib/auth/api-scopes";
import { PERMISSIONS, type Permission } from "@/lib/auth/permissions";

describe("API token scopes", () => {
  it("maps every permission to a scope or keeps it for signed-in people on purpose", () => {
    // A new permission in lib/auth/permissions.ts must be placed in a scope or in SESSION_ONLY_PERMISSIONS.
    expect(unmappedPermissions()).toEqual([]);
    for (const s of Object.values(API_SCOPES)) for (const p of s.permissions) expect(Object.keys(PERMISSIONS)).toContain(p);
    for (const p of SESSION_ONLY_PERMISSIONS) expect(scopesAllow(Object.keys(API_SCOPES), p)).toBe(false);
  });

  it("acts with the intersection of the scopes and the creator's role", () => {
    expect(actorCan({ role: "admin", token_scopes: ["shop:read"] }, "shop:read")).toBe(true);
    expect(actorCan({ role: "admin", token_scopes: ["shop:read"] }, "orders:write")).toBe(false);
    expect(actorCan({ role: "admin", token_scopes: ["orders:write"] }, "orders:write")).toBe(true);
    // the scope allows it, the role does not
    expect(actorCan({ role: "manager", token_scopes: ["schedule:write"] }, "builds:schedule")).toBe(false);
    // no token: the role alone, as for a session
    expect(actorCan({ role: "manager" }, "orders:write")).toBe(true);
    expect(actorCan({ role: "admin", token_scopes: Object.keys(API_SCOPES) }, "users:admin" as Permission)).toBe(false);
    expect(actorCan(null, "shop:read")).toBe(false);
  });

  it("reads the bearer token from the Authorization header (RFC 6750 §2.1)", () => {
    expect(bearerToken("Bearer abc")).toBe("abc");
    expect(bearerToken("bearer   abc ")).toBe("abc");
    expect(bearerToken("Basic YWxhZGRpbjpvcGVuc2VzYW1l")).toBeNull();
    expect(bearerToken(null)).toBeNull();
    expect(bearerToken("Bearer")).toBe("");
    // a malformed credential is still a bearer attempt (a 401), never a cookie request
    expect(bearerToken("Bearer a b")).toBe("a b");
    expect(bearerToken("Bearerabc")).toBeNull();
  });

  it("issues 256-bit tokens with a recognisable prefix and keeps only their sha-256", () => {
    const t = newApiToken();
    expect(looksLikeApiToken(t)).toBe(true);
    expect(looksLikeApiToken(t.slice(0, -1))).toBe(false);
    expect(newApiToken()).not.toBe(t);
    // sha-256("abc") from FIPS 180-2, appendix B.1
    expect(hashApiToken("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
    expect(tokenHint(t)).toBe(`${t.slice(0, 8)}…`);
  });

  it("says how long to wait for the window to end, never less than a second", () => {
    expect(retryAfterSeconds(0, 0)).toBe(60);
    expect(retryAfterSeconds(0, 59_001)).toBe(1);
    expect(retryAfterSeconds(0, 70_000)).toBe(1);
  });

  it("validates a new token with field and reason", () => {
    const bad = createApiTokenSchema.safeParse({ name: "", scopes: ["users:admin"], expires_in_days: 0 });
    expect(bad.success).toBe(false);
    const paths = bad.error!.issues.map((i) => i.path.join("."));
    expect(paths).toEqual(expect.arrayContaining(["name", "scopes.0", "expires_in_days"]));
    const ok = createApiTokenSchema.parse({ name: " ERP ", scopes: ["shop:read", "shop:read"] });
    expect(ok).toEqual({ name: "ERP", scopes: ["shop:read"], rate_limit_per_minute: 600 });
  });
});
