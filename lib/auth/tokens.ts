import { createHash, randomBytes } from "node:crypto";

// Set-password links. The token travels only in the e-mail; the database keeps its sha-256, so
// a leaked table cannot be turned into working links.

export type TokenKind = "invite" | "reset";

export const TOKEN_TTL_MS: Record<TokenKind, number> = {
  invite: 48 * 60 * 60 * 1000,
  reset: 60 * 60 * 1000,
};

export function newToken(): string {
  return randomBytes(32).toString("base64url");
}

export function hashToken(token: string): string {
  return createHash("sha256").update(token, "utf8").digest("hex");
}

/** A token as we issue it: 43 base64url characters. Anything else is rejected before a lookup. */
export function looksLikeToken(token: string): boolean {
  return /^[A-Za-z0-9_-]{43}$/.test(token);
}

export function setPasswordUrl(appUrl: string, token: string): string {
  const url = new URL("/set-password", appUrl);
  url.searchParams.set("token", token);
  return url.toString();
}
