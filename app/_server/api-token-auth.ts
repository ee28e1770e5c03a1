import { cache } from "react";
import { headers } from "next/headers";
import { getDb } from "@/db/client";
import { useApiToken } from "@/db/api-tokens/commands";
import { findActiveUserById, type CurrentUser } from "@/db/users/reads";
import { AppError } from "@/lib/errors";
import { bearerToken, looksLikeApiToken, retryAfterSeconds } from "@/lib/auth/api-scopes";
import { isBearerTokenRequest } from "@/lib/http/cross-site";

// Requests from other programs carry `Authorization: Bearer hth_…` instead of the session cookie.

/** A user acting through a token: the token's scopes narrow what the role allows. */
export type TokenUser = CurrentUser & { token_scopes: string[]; api_token_id: string };

/** The bearer token of the current request, when it has one. */
export async function currentBearer(): Promise<string | null> {
  const h = await headers();
  return isBearerTokenRequest(h) ? bearerToken(h.get("authorization")) : null;
}

const UNAUTHENTICATED = "The API token is not valid: unknown, revoked or expired.";

/**
 * Authenticates the request's token once per request (the rate-limit count is per request):
 * 401 for an unknown, revoked or expired token or a deactivated creator, 429 with the wait when
 * the token's window is full.
 */
export const authenticateBearer = cache(async (token: string, address: string): Promise<TokenUser> => {
  if (!looksLikeApiToken(token)) throw new AppError("unauthenticated", UNAUTHENTICATED);
  const db = getDb();
  const use = await useApiToken(db, token, address);
  if (!use) throw new AppError("unauthenticated", UNAUTHENTICATED);
  if (use.over_limit) {
    const wait = retryAfterSeconds(use.window_started_at.getTime(), Date.now());
    throw new AppError("too_many_requests", `This API token has used its requests for this minute; try again in ${wait} s.`, undefined, { retry_after_s: wait });
  }
  const user = await findActiveUserById(db, use.created_by);
  if (!user) throw new AppError("unauthenticated", "The API token's creator is no longer active.");
  return { ...user, token_scopes: use.scopes, api_token_id: use.id };
});
