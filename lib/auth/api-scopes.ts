import { createHash, randomBytes } from "node:crypto";
import { z } from "zod";
import { PERMISSIONS, can, type Permission, type Role } from "./permissions";

// API tokens for other programs. A token names scopes; each scope stands for a set of the
// permissions in ./permissions.ts (the single source of who may do what). A request made with a
// token may do what BOTH its scopes and its creator's current role allow, so demoting or
// deactivating the admin who made a token narrows or ends the token at once.

export const API_SCOPES = {
  "shop:read": {
    label: "Read shop",
    hint: "Read orders, parts, units, builds, batches, runs, inspections, capacity and set-up.",
    permissions: ["shop:read", "capacity:read"],
  },
  "orders:write": {
    label: "Write orders",
    hint: "Create and change orders and parts, import parts, upload geometry.",
    permissions: ["orders:write", "orders:prioritize", "parts:write", "geometry:upload"],
  },
  "schedule:write": {
    label: "Write schedule",
    hint: "Create and schedule builds, wash batches and furnace runs; propose and apply plans.",
    permissions: ["builds:write", "builds:schedule", "plan:propose", "plan:apply", "wash:write", "furnace:write"],
  },
  "floor:record": {
    label: "Record floor work",
    hint: "Record wash masses, operate furnace runs, finishing steps and inspections.",
    permissions: ["wash:record", "furnace:operate", "finishing:write", "inspections:write"],
  },
  "inventory:write": {
    label: "Write inventory",
    hint: "Receive, release and recall feedstock lots; record consumables.",
    permissions: ["inventory:write", "inventory:recall", "consumables:write"],
  },
  "activity:read": {
    label: "Read the activity log",
    hint: "Read who changed what and when, and export it.",
    permissions: ["activity:read"],
  },
  "quotes:read": {
    label: "Read quotes",
    hint: "Read quotes, their prices and promise dates, and the quoting rates.",
    permissions: ["quotes:read"],
  },
  "quotes:write": {
    label: "Write quotes",
    hint: "Create, price, send and convert quotes.",
    permissions: ["quotes:read", "quotes:write"],
  },
  "setup:write": {
    label: "Write set-up",
    hint: "Change equipment, materials, sinter profiles, shop settings; apply calibration.",
    permissions: ["setup:write", "calibration:apply"],
  },
} as const satisfies Record<string, { label: string; hint: string; permissions: readonly Permission[] }>;

export type ApiScope = keyof typeof API_SCOPES;

/** A token as the admin screen lists it (db/api-tokens/reads.ts makes it): never the token or its hash. */
export type ApiTokenRow = {
  id: string;
  name: string;
  token_hint: string;
  scopes: string[];
  created_at: string;
  created_by_name: string;
  expires_at: string | null;
  revoked_at: string | null;
  last_used_at: string | null;
  last_used_from: string | null;
  rate_limit_per_minute: number;
  status: "active" | "expired" | "revoked";
};
export const API_SCOPE_NAMES = Object.keys(API_SCOPES) as ApiScope[];

/**
 * Permissions no token carries, whatever its scopes: managing people and tokens, reading captured
 * mail and the job queues, changing the creator's own account, and the phone scanner page (a
 * page for a person on the floor, with no API of its own) stay with a signed-in person.
 */
export const SESSION_ONLY_PERMISSIONS: readonly Permission[] = ["users:admin", "mail:read", "jobs:read", "self:write", "floor:scan"];

export function scopesAllow(scopes: readonly string[], permission: Permission): boolean {
  return scopes.some((s) => s in API_SCOPES && (API_SCOPES[s as ApiScope].permissions as readonly Permission[]).includes(permission));
}

/** Who is acting: a person with a session (no scopes) or a token (its scopes, on its creator's role). */
export type Actor = { role: Role; token_scopes?: readonly string[] | null };

/** The one check for an actor: the role must allow it, and a token's scopes must too. */
export function actorCan(actor: Actor | null | undefined, permission: Permission): boolean {
  if (!actor || !can(actor.role, permission)) return false;
  return actor.token_scopes ? scopesAllow(actor.token_scopes, permission) : true;
}

/** Every permission is either reachable by some scope or deliberately session-only. */
export function unmappedPermissions(): Permission[] {
  return (Object.keys(PERMISSIONS) as Permission[]).filter((p) => !SESSION_ONLY_PERMISSIONS.includes(p) && !scopesAllow(API_SCOPE_NAMES, p));
}

// Tokens: "hth_" and 43 base64url characters (256 random bits). The prefix lets secret scanners
// and people recognise one; the database keeps only its sha-256 (see the migration for why a
// fast hash is right here).
const TOKEN_PREFIX = "hth_";
const TOKEN_RE = /^hth_[A-Za-z0-9_-]{43}$/;

export function newApiToken(): string {
  return TOKEN_PREFIX + randomBytes(32).toString("base64url");
}

export function looksLikeApiToken(token: string): boolean {
  return TOKEN_RE.test(token);
}

export function hashApiToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/** What the list shows so tokens can be told apart: the prefix and the first 4 random characters. */
export function tokenHint(token: string): string {
  return `${token.slice(0, TOKEN_PREFIX.length + 4)}…`;
}

/** The token in an `Authorization: Bearer …` header; null when the header is absent or another scheme. */
export function bearerToken(authorization: string | null | undefined): string | null {
  if (!authorization) return null;
  // Any credentials after the Bearer scheme (RFC 6750 §2.1), even none or a malformed one, make a
  // bearer attempt (a 401 when it is no token), never a cookie request.
  const m = /^Bearer(?:\s+([\s\S]*))?$/i.exec(authorization.trim());
  return m ? (m[1] ?? "").trim() : null;
}

export const RATE_WINDOW_SECONDS = 60;

/** Seconds until a fixed window that started at windowStartMs ends (at least 1). */
export function retryAfterSeconds(windowStartMs: number, nowMs: number, windowSeconds = RATE_WINDOW_SECONDS): number {
  return Math.max(1, Math.ceil((windowStartMs + windowSeconds * 1000 - nowMs) / 1000));
}

export const createApiTokenSchema = z.object({
  name: z.string().trim().min(1, "Give the token a name").max(80, "At most 80 characters"),
  scopes: z.array(z.enum(API_SCOPE_NAMES as [ApiScope, ...ApiScope[]])).min(1, "Pick at least one scope").transform((s) => [...new Set(s)]),
  expires_in_days: z.coerce.number().int("Whole days").min(1, "At least 1 day").max(3650, "At most 3650 days").nullish(),
  rate_limit_per_minute: z.coerce.number().int("A whole number").min(1, "At least 1").max(100000, "At most 100000").default(600),
});
export type CreateApiTokenInput = z.infer<typeof createApiTokenSchema>;
